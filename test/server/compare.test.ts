// Revision comparison (shared/compare): steps, parameters, data and results between two revisions.
// Inputs are small hand-made worksheets; expected changes follow from the definitions in
// shared/compare/compare.ts (steps matched by id, moves = steps outside a longest common subsequence).
import { expect } from 'chai';
import { compareRevisions, columnSummary } from '@shared/compare/compare';
import { longestCommonSubsequence, rowMultisetChange, relativeChange } from '@shared/compare/diff';
import { WorksheetSchema, type WorksheetInput } from '@shared/format/worksheet';
import { emptyResult, numberValue, type EvaluationResult, type StepResult } from '@shared/engine/result';

const doc = (steps: WorksheetInput['steps'], title = 'Bore gauge repeatability') =>
  WorksheetSchema.parse({ format: 'spreadproof.worksheet', version: 1, title, steps });

const data = (id: string, values: number[]) => ({
  id,
  kind: 'data' as const,
  params: { origin: 'inline' as const, columns: [{ name: 'bore', type: 'number' as const, unit: 'um', values }] },
});
const interval = (id: string, levels: number[], title?: string) => ({
  id,
  kind: 'sigma-interval' as const,
  ...(title ? { title } : {}),
  params: { source: { step: 'd1', column: 'bore' }, levels },
});
const note = (id: string, markdown: string) => ({ id, kind: 'note' as const, params: { markdown } });

const noResults: EvaluationResult = { format: 'spreadproof.results', engineVersion: 'x', worksheetHash: 'h', steps: [], counts: { ok: 0, error: 0 } };

function results(steps: StepResult[]): EvaluationResult {
  return { ...noResults, steps, counts: { ok: steps.length, error: 0 } };
}

describe('revision comparison', () => {
  it('reports nothing for identical revisions', () => {
    const a = doc([data('d1', [1, 2, 3]), interval('s1', [0.95])]);
    const c = compareRevisions({ document: a, results: noResults }, { document: structuredClone(a), results: noResults });
    expect(c.identical).to.equal(true);
    expect(c.steps).to.deep.equal([]);
    expect(c.data).to.deep.equal([]);
    expect(c.results).to.deep.equal([]);
    expect(c.conclusions).to.deep.equal([]);
    expect(c.title).to.equal(null);
  });

  it('tells added, removed, moved and changed steps apart, parameter by parameter', () => {
    const a = doc([note('n1', 'intro'), data('d1', [1, 2, 3]), interval('s1', [0.95]), note('n2', 'old')]);
    // n1 moves to the end, s1 gets another level, n2 is removed, n3 is added.
    const b = doc([data('d1', [1, 2, 3]), interval('s1', [0.95, 0.99]), note('n3', 'new'), note('n1', 'intro')]);
    const c = compareRevisions({ document: a, results: noResults }, { document: b, results: noResults });
    const byId = Object.fromEntries(c.steps.map((s) => [s.stepId, s]));
    expect(Object.keys(byId).sort()).to.deep.equal(['n1', 'n2', 'n3', 's1']);
    expect(byId.n1).to.include({ change: 'moved', fromIndex: 0, toIndex: 3 });
    expect(byId.n1.params).to.deep.equal([]);
    expect(byId.n2).to.include({ change: 'removed', fromIndex: 3, toIndex: null });
    expect(byId.n3).to.include({ change: 'added', fromIndex: null, toIndex: 2 });
    expect(byId.s1).to.include({ change: 'changed', fromIndex: 2, toIndex: 1 });
    expect(byId.s1.params).to.deep.equal([{ path: 'params.levels.1', from: null, to: 0.99 }]);
    expect(c.summary).to.include({ added: 1, removed: 1, moved: 1, changed: 1 });
    expect(c.identical).to.equal(false);
  });

  it('reports a step that both moved and changed, and a changed title', () => {
    const a = doc([data('d1', [1, 2, 3]), note('n1', 'a'), interval('s1', [0.9])], 'Old title');
    const b = doc([data('d1', [1, 2, 3]), interval('s1', [0.9], 'Sigma at 90 %'), note('n1', 'a')], 'New title');
    const c = compareRevisions({ document: a, results: noResults }, { document: b, results: noResults });
    expect(c.title).to.deep.equal({ from: 'Old title', to: 'New title' });
    const moved = c.steps.filter((s) => s.change !== 'changed');
    expect(moved).to.have.length(1);
    // Either n1 or s1 is the one that moved; the LCS picks one, and s1 also changed its title.
    const s1 = c.steps.find((s) => s.stepId === 's1')!;
    expect(s1.params).to.deep.equal([{ path: 'title', from: null, to: 'Sigma at 90 %' }]);
    expect(s1.label).to.equal('Sigma at 90 %');
  });

  it('reports rows added and removed and the change of the column summary for inline data', () => {
    const a = doc([data('d1', [10, 11, 12, 12])]);
    const b = doc([data('d1', [10, 12, 13, 14, 12])]);
    const c = compareRevisions({ document: a, results: noResults }, { document: b, results: noResults });
    expect(c.steps).to.have.length(0); // cells are data, not parameters
    expect(c.data).to.have.length(1);
    const d = c.data[0];
    expect(d).to.include({ stepId: 'd1', rowsFrom: 4, rowsTo: 5, rowsAdded: 2, rowsRemoved: 1 });
    expect(d.columns[0].change).to.equal('changed');
    expect(d.columns[0].from).to.include({ n: 4, mean: 11.25, min: 10, max: 12 });
    expect(d.columns[0].to).to.include({ n: 5, mean: 12.2, min: 10, max: 14 });
    // sd of 10, 11, 12, 12: mean 11.25, squared deviations 1.5625 + 0.0625 + 0.5625 + 0.5625 = 2.75, / 3.
    expect(d.columns[0].from!.sd).to.be.closeTo(Math.sqrt(2.75 / 3), 1e-15);
  });

  it('compares uploaded datasets through the tables it is given', () => {
    const idA = 'a'.repeat(64);
    const idB = 'b'.repeat(64);
    const step = (datasetId: string) => ({ id: 'd1', kind: 'data' as const, params: { origin: 'dataset' as const, datasetId } });
    const a = doc([step(idA)]);
    const b = doc([step(idB)]);
    const table = (values: number[]) => ({ rowCount: values.length, columns: [{ name: 'x', type: 'number' as const, values: Float64Array.from(values) }] });
    const c = compareRevisions(
      { document: a, results: noResults },
      { document: b, results: noResults },
      { datasets: { [idA]: table([1, 2, 3]), [idB]: table([1, 2, 3, 4]) } },
    );
    expect(c.steps[0].params).to.deep.equal([{ path: 'params.datasetId', from: idA, to: idB }]);
    expect(c.data[0]).to.include({ datasetFrom: idA, datasetTo: idB, rowsAdded: 1, rowsRemoved: 0 });
    // Without the tables only the ids are known.
    const blind = compareRevisions({ document: a, results: noResults }, { document: b, results: noResults });
    expect(blind.data[0]).to.include({ rowsFrom: null, rowsTo: null, rowsAdded: null });
  });

  it('reports numeric result changes with relative change and flipped conclusions', () => {
    const a = doc([data('d1', [1, 2, 3]), interval('s1', [0.95])]);
    const r = (upper: number, reject: boolean) => {
      const s = emptyResult('s1', 'sigma-interval', 'Sigma interval');
      s.values.push(numberValue('upper', 'Upper bound of sigma', upper, { unit: 'um' }), numberValue('n', 'n', 3));
      s.conclusions.push({ id: 'upperBoundMeetsTarget', value: reject, statement: 'The upper bound is at most the required sigma' });
      return results([emptyResult('d1', 'data', 'Data'), s]);
    };
    const c = compareRevisions({ document: a, results: r(0.5, true) }, { document: a, results: r(0.6, false) });
    expect(c.results).to.have.length(1);
    expect(c.results[0]).to.include({ stepId: 's1', path: 'values.upper', name: 'Upper bound of sigma', from: 0.5, to: 0.6, unit: 'um' });
    expect(c.results[0].relativeChange).to.be.closeTo(0.2, 1e-15);
    expect(c.results[0].fromDisplay).to.equal('0.5000');
    expect(c.conclusions).to.deep.equal([
      {
        stepId: 's1',
        label: 'sigma-interval s1',
        id: 'upperBoundMeetsTarget',
        statement: 'The upper bound is at most the required sigma',
        from: true,
        to: false,
        flipped: true,
      },
    ]);
    expect(c.summary).to.include({ resultsChanged: 1, conclusionsFlipped: 1 });
  });

  it('reports a step that started failing as a flipped status', () => {
    const a = doc([data('d1', [1, 2, 3]), interval('s1', [0.95])]);
    const ok = emptyResult('s1', 'sigma-interval', 'S');
    const bad = { ...emptyResult('s1', 'sigma-interval', 'S'), status: 'error' as const };
    const c = compareRevisions({ document: a, results: results([ok]) }, { document: a, results: results([bad]) });
    expect(c.conclusions[0]).to.include({ id: 'status', from: true, to: false, flipped: true });
  });
});

describe('comparison building blocks', () => {
  it('longest common subsequence keeps the most steps in place', () => {
    expect([...longestCommonSubsequence(['a', 'b', 'c', 'd'], ['b', 'c', 'd', 'a'])]).to.deep.equal(['b', 'c', 'd']);
    expect([...longestCommonSubsequence([], ['a'])]).to.deep.equal([]);
  });
  it('row changes count duplicates as a multiset', () => {
    expect(rowMultisetChange(['1', '1', '1', '2'], ['1', '1', '3'])).to.deep.equal({ added: 1, removed: 2 });
  });
  it('relative change is null where it has no meaning', () => {
    expect(relativeChange(2, 3)).to.equal(0.5);
    expect(relativeChange(-2, -3)).to.equal(-0.5);
    expect(relativeChange(0, 3)).to.equal(null);
    expect(relativeChange(null, 3)).to.equal(null);
  });
  it('column summaries skip blanks and text in numeric columns', () => {
    expect(columnSummary('number', [1, null, 'x', 3])).to.deep.include({ n: 2, missing: 2, mean: 2, min: 1, max: 3 });
  });
});
