// The pure parts of the worksheet editor: tables pasted as text, the settings fields (percent
// levels, bounds, messages), draft edits (new steps, move, duplicate, confidence what-if) and the
// drafts kept in the browser. References: RFC 4180 for quoted CSV cells; the worksheet format
// (shared/format/worksheet.ts) for the shapes the edits must produce; the rest is common practice
// of spreadsheet copy-paste (tab-separated rows, header row of names), stated per test.
import { expect } from 'chai';
import type { Step, Worksheet } from '../../shared/format/worksheet';
import { WorksheetSchema } from '../../shared/format/worksheet';
import {
  MAX_TEXT_CELLS,
  MAX_TEXT_ROWS,
  TableTextError,
  cellNumber,
  columnsToText,
  detectDelimiter,
  parseTableText,
  splitRows,
} from '../../client/src/app/worksheets/data/table-text';
import {
  createStep,
  dataStepsBefore,
  documentAtLevel,
  duplicateStep,
  moveStep,
  newStepId,
  parseConfidence,
  setGroupColumn,
  stableStringify,
  stepsReadingFrom,
  withConfidence,
} from '../../client/src/app/worksheets/editor/draft-document';
import { DraftStorage, KeyValueStore } from '../../client/src/app/worksheets/editor/draft-storage';
import { applyField, fieldText, fieldsFor, parseField } from '../../client/src/app/worksheets/editor/param-fields';

function worksheet(steps: Step[]): Worksheet {
  return { format: 'spreadproof.worksheet', version: 1, title: 'Test', steps };
}

const dataStep: Step = {
  id: 'data-1',
  kind: 'data',
  params: {
    origin: 'inline',
    columns: [
      { name: 'reading', type: 'number', unit: 'um', values: [1.2, 1.4, 1.1] },
      { name: 'line', type: 'text', values: ['A', 'B', 'A'] },
    ],
  },
};

describe('client: tables pasted or typed as text', () => {
  it('reads a block copied from a spreadsheet (tabs, header row)', () => {
    const parsed = parseTableText('reading\tline\n1.2\tA\n1.4\tB\n\n');
    expect(parsed.delimiter).to.equal('\t');
    expect(parsed.hasHeader).to.equal(true);
    expect(parsed.rowCount).to.equal(2);
    expect(parsed.columns).to.deep.equal([
      { name: 'reading', type: 'number', values: [1.2, 1.4] },
      { name: 'line', type: 'text', values: ['A', 'B'] },
    ]);
  });

  it('accepts decimal commas when the cells are separated by semicolons or tabs, not by commas', () => {
    const parsed = parseTableText('d;n\n1,5;2\n2,25;3\n');
    expect(parsed.delimiter).to.equal(';');
    expect(parsed.decimalComma).to.equal(true);
    expect(parsed.columns[0]!.values).to.deep.equal([1.5, 2.25]);
    expect(detectDelimiter('1,5\n2,5\n')).to.not.equal(',');
    expect(cellNumber('1,5', false)).to.equal(null);
    expect(cellNumber(' 1e-3 ', false)).to.equal(0.001);
  });

  it('keeps cells that are not numbers as text in a numeric column (left out, never zero)', () => {
    const parsed = parseTableText('x\n1\n2\nn/a\n4\n5\n6\n');
    expect(parsed.columns[0]!.type).to.equal('number');
    expect(parsed.columns[0]!.values).to.deep.equal([1, 2, 'n/a', 4, 5, 6]);
    expect(parsed.notes.join(' ')).to.match(/1 cell is not a number/);
  });

  it('honours quoted cells with delimiters and doubled quotes (RFC 4180)', () => {
    expect(splitRows('a,"b, c","say ""hi"""\n', ',')).to.deep.equal([['a', 'b, c', 'say "hi"']]);
  });

  it('names the line of a quote that is never closed', () => {
    expect(() => parseTableText('reading\n1.2\n"1.3\n1.4\n')).to.throw(TableTextError, /line 3/);
  });

  it('refuses rows longer than the header, an empty text, and a header without rows', () => {
    expect(() => parseTableText('a,b\n1,2\n1,2,3\n')).to.throw(TableTextError, /Line 3 has more cells/);
    expect(() => parseTableText('   \n')).to.throw(TableTextError, /nothing to read/);
    expect(() => parseTableText('reading,line\n')).to.throw(TableTextError, /no data rows/);
  });

  it('sends tables too large for a worksheet body to the file upload, by rows and by cells', () => {
    // The worksheet document travels as a JSON body of at most 1 MB (server limit, README).
    const rows = (count: number, width: number) =>
      [Array.from({ length: width }, (_, j) => `c${j}`).join(','), ...Array.from({ length: count }, (_, i) => Array(width).fill(String(i)).join(','))].join('\n');
    expect(parseTableText(rows(MAX_TEXT_ROWS, 1)).columns[0].values).to.have.length(MAX_TEXT_ROWS);
    expect(() => parseTableText(rows(MAX_TEXT_ROWS + 1, 1))).to.throw(TableTextError, /rows; at most .* Upload it as a file/);
    const width = 4;
    const fitting = Math.floor(MAX_TEXT_CELLS / width);
    expect(parseTableText(rows(fitting, width)).columns).to.have.length(width);
    expect(() => parseTableText(rows(fitting + 1, width))).to.throw(TableTextError, /cells; at most .* Upload it as a file/);
  });

  it('writes columns back as text that reads back to the same columns', () => {
    const columns = dataStep.kind === 'data' && dataStep.params.origin === 'inline' ? dataStep.params.columns : [];
    const text = columnsToText(columns);
    expect(text).to.equal('reading,line\n1.2,A\n1.4,B\n1.1,A\n');
    const again = parseTableText(text);
    expect(again.columns.map((c) => c.values)).to.deep.equal([
      [1.2, 1.4, 1.1],
      ['A', 'B', 'A'],
    ]);
  });
});

describe('client: settings fields of the analysis steps', () => {
  const interval = createStep('sigma-interval', worksheet([dataStep]), dataStepsBefore(worksheet([dataStep]), 1, () => null, (s) => s.id));

  it('shows levels in percent and stores fractions', () => {
    const [levels] = fieldsFor(interval);
    expect(levels!.path).to.equal('params.levels');
    expect(fieldText(interval, levels!)).to.equal('95');
    const applied = applyField(interval, levels!, '90, 95 99.9');
    expect('step' in applied && (applied.step.params as { levels: number[] }).levels).to.deep.equal([0.9, 0.95, 0.999]);
  });

  it('explains a level out of range or not a number', () => {
    const [levels] = fieldsFor(interval);
    expect(parseField(levels!, '95, 150')).to.deep.equal({ ok: false, message: 'A confidence level must be above 0 and below 100 % (got 150).' });
    expect(parseField(levels!, 'high')).to.deep.equal({ ok: false, message: '“high” is not a number of percent.' });
    expect(parseField(levels!, '')).to.deep.equal({ ok: false, message: 'Enter at least one level, e.g. 95.' });
  });

  it('checks strict bounds of the required sigma and optional limits', () => {
    const test = createStep('target-test', worksheet([dataStep]), []);
    const sigma0 = fieldsFor(test).find((f) => f.path === 'params.sigma0')!;
    expect(parseField(sigma0, '0')).to.deep.equal({ ok: false, message: 'Required standard deviation σ₀ must be greater than 0.' });
    expect(parseField(sigma0, '0,5')).to.deep.equal({ ok: true, value: 0.5 });
    const capability = createStep('capability', worksheet([dataStep]), []);
    const lsl = fieldsFor(capability).find((f) => f.path === 'params.lsl')!;
    expect(parseField(lsl, '')).to.deep.equal({ ok: true, value: undefined });
  });

  it('shows the fields of the chosen sample-size goal only', () => {
    const plan = createStep('sample-size-plan', worksheet([]), []);
    expect(fieldsFor(plan).map((f) => f.path)).to.include('params.plan.ratio').and.not.include('params.plan.power');
    const power = applyField(plan, fieldsFor(plan)[0]!, 'chi-square-power');
    expect('step' in power).to.equal(true);
  });
});

describe('client: draft edits', () => {
  it('creates steps the worksheet schema accepts, reading the nearest data step', () => {
    let document = worksheet([dataStep]);
    for (const kind of ['spread-summary', 'sigma-interval', 'target-test', 'two-sample-ratio', 'group-comparison', 'normality-check', 'sample-size-plan', 'capability', 'note', 'derived-column', 'data'] as const) {
      const step = createStep(kind, document, dataStepsBefore(document, document.steps.length, () => null, (s) => s.id));
      document = { ...document, steps: [...document.steps, step] };
    }
    const parsed = WorksheetSchema.safeParse(document);
    expect(parsed.success, JSON.stringify(parsed.error?.issues)).to.equal(true);
    const spread = document.steps[1]!;
    expect(spread.params).to.deep.equal({ source: { step: 'data-1', column: 'reading' } });
    const ratio = document.steps.find((s) => s.kind === 'two-sample-ratio')!;
    expect((ratio.params as { source: object }).source).to.deep.equal({ step: 'data-1', column: 'reading', groupBy: 'line' });
  });

  it('gives new ids that are unused, and duplicates right after the original', () => {
    const document = worksheet([dataStep, { id: 'data-2', kind: 'note', params: { markdown: '' } }]);
    expect(newStepId('data', document)).to.equal('data-3');
    const copy = duplicateStep(document, 'data-1', 'Data')!;
    expect(copy.document.steps.map((s) => s.id)).to.deep.equal(['data-1', 'data-3', 'data-2']);
    expect(copy.copy.title).to.equal('Data (copy)');
  });

  it('moves steps and finds the steps that read from one', () => {
    const document = worksheet([dataStep, { id: 'spread-1', kind: 'spread-summary', params: { source: { step: 'data-1', column: 'reading' } } }]);
    expect(moveStep(document, 1, 0).steps.map((s) => s.id)).to.deep.equal(['spread-1', 'data-1']);
    expect(moveStep(document, 0, 0)).to.equal(document);
    expect(stepsReadingFrom(document, 'data-1')).to.deep.equal(['spread-1']);
  });

  it('views interval and test steps at another level without touching the others', () => {
    const test: Step = { id: 'target-1', kind: 'target-test', params: { source: { step: 'data-1', column: 'reading' }, sigma0: 0.5, alternative: 'greater', alpha: 0.05 } };
    // 1 − 0.99 in binary floating point is 0.010000000000000009; the step must get 0.01.
    expect((withConfidence(test, 0.99)!.params as { alpha: number }).alpha).to.equal(0.01);
    const document = worksheet([dataStep, test]);
    const at = documentAtLevel(document, 'target-1', 0.9)!;
    expect(at.steps[0]).to.equal(document.steps[0]);
    expect(withConfidence(dataStep, 0.9)).to.equal(null);
  });

  it('reads typed levels in percent or as a fraction, and refuses others', () => {
    expect(parseConfidence('99')).to.deep.equal({ level: 0.99 });
    expect(parseConfidence('99.9 %')).to.deep.equal({ level: 0.999 });
    expect(parseConfidence('0.9')).to.deep.equal({ level: 0.9 });
    expect(parseConfidence('100')).to.have.property('error');
    expect(parseConfidence('ninety')).to.have.property('error');
  });

  it('sets the group column of the grouped steps that read a table', () => {
    const document = worksheet([dataStep, { id: 'groups-1', kind: 'group-comparison', params: { source: { step: 'data-1', column: 'reading' }, alpha: 0.05 } }]);
    const grouped = setGroupColumn(document, 'data-1', 'line');
    expect((grouped.steps[1]!.params as { source: object }).source).to.deep.equal({ step: 'data-1', column: 'reading', groupBy: 'line' });
    expect((setGroupColumn(grouped, 'data-1', null).steps[1]!.params as { source: object }).source).to.deep.equal({ step: 'data-1', column: 'reading' });
  });

  it('compares documents whatever their key order', () => {
    expect(stableStringify({ b: 1, a: [1, { d: 2, c: undefined }] })).to.equal(stableStringify({ a: [1, { d: 2 }], b: 1 }));
  });
});

describe('client: drafts kept in the browser', () => {
  function memoryStore(): KeyValueStore {
    const map = new Map<string, string>();
    return {
      get length() {
        return map.size;
      },
      key: (i) => [...map.keys()][i] ?? null,
      getItem: (k) => map.get(k) ?? null,
      setItem: (k, v) => void map.set(k, v),
      removeItem: (k) => void map.delete(k),
    };
  }

  it('keeps a draft per worksheet and base revision, and lists drafts of older revisions', () => {
    const storage = new DraftStorage(memoryStore());
    const document = worksheet([dataStep]);
    expect(storage.save({ worksheetId: 'w', baseRevisionId: 'r1', document, savedAt: '2025-01-01T10:00:00.000Z' })).to.equal(true);
    storage.save({ worksheetId: 'w', baseRevisionId: 'r2', document, savedAt: '2025-01-02T10:00:00.000Z' });
    expect(storage.load('w', 'r2')?.document).to.deep.equal(document);
    expect(storage.load('w', 'r3')).to.equal(null);
    expect(storage.others('w', 'r2').map((d) => d.baseRevisionId)).to.deep.equal(['r1']);
    storage.remove('w', 'r1');
    expect(storage.others('w', 'r2')).to.deep.equal([]);
  });

  it('ignores damaged entries and works without storage', () => {
    const store = memoryStore();
    store.setItem('spreadproof:draft:w:r1', '{not json');
    expect(new DraftStorage(store).load('w', 'r1')).to.equal(null);
    const none = new DraftStorage(null);
    expect(none.save({ worksheetId: 'w', baseRevisionId: 'r', document: worksheet([]), savedAt: '' })).to.equal(false);
    expect(none.others('w', 'r')).to.deep.equal([]);
  });
});
