// evaluate() on the example worksheets (Harrow Vale Precision), derived-column and note steps.
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import { compile } from 'vega-lite';
import { evaluate } from '@shared/engine/evaluate';
import { canonicalJson } from '@shared/engine/hash';
import type { EvaluationResult, ResultValue, StepResult } from '@shared/engine/result';
import { repoRoot } from './support/check';

const examplesDir = path.join(repoRoot, 'examples');
const exampleFiles = readdirSync(examplesDir).filter((f) => f.endsWith('.json')).sort();
const readExample = (file: string) => JSON.parse(readFileSync(path.join(examplesDir, file), 'utf8'));
const doc = (steps: unknown[]) => ({ format: 'spreadproof.worksheet', version: 1, title: 'test', steps });
const data = (values: (number | string | null)[], id = 'd') => ({
  id, kind: 'data', params: { origin: 'inline', columns: [{ name: 'x', type: 'number', unit: 'um', values }] },
});

function step(result: EvaluationResult, id: string): StepResult {
  const s = result.steps.find((r) => r.stepId === id);
  if (!s) throw new Error(`no result for ${id}`);
  return s;
}
function value(s: StepResult, id: string): ResultValue {
  const v = s.values.find((x) => x.id === id);
  if (!v) throw new Error(`no value ${id} in ${s.stepId}`);
  return v;
}
function expectError(result: EvaluationResult, id: string, code: string, field: string): string {
  const s = step(result, id);
  expect(s.status, `${id}: ${JSON.stringify(s.error)}`).to.equal('error');
  expect(s.error?.code).to.equal(code);
  expect(s.error?.field).to.equal(field);
  expect(s.error?.message).to.contain(`Step "${id}"`);
  return s.error!.message;
}
function checkValues(result: EvaluationResult): void {
  canonicalJson(result);
  for (const s of result.steps) {
    for (const v of [...s.values, ...s.tables.flatMap((t) => t.rows.flatMap((r) => r.cells))]) {
      if (v.value === null) expect(v.reason, `${s.stepId}.${v.id}`).to.be.a('string');
      expect(v.display).to.not.match(/NaN|Infinity/);
    }
  }
}

describe('evaluate: example worksheets (Harrow Vale Precision)', function () {
  this.timeout(20_000);
  for (const file of exampleFiles) {
    it(`${file}: every step evaluates, results are finite, plots compile with Vega-Lite and use no expressions`, () => {
      const result = evaluate(readExample(file));
      for (const s of result.steps) expect(s.status, `${s.stepId}: ${s.error?.message}`).to.equal('ok');
      checkValues(result);
      for (const s of result.steps) {
        if (s.kind !== 'data' && s.kind !== 'note' && s.kind !== 'derived-column') {
          expect(s.reading, s.stepId).to.not.equal('');
          expect(s.sources.length, s.stepId).to.be.above(0);
          expect(s.caution, s.stepId).to.be.a('string');
        }
        if (s.plot) {
          const text = JSON.stringify(s.plot);
          expect(text).to.not.match(/"(expr|calculate|filter|signal|transform)"/);
          expect(() => compile(s.plot as never), s.stepId).to.not.throw();
        }
      }
    });
  }

  it('the bore-gauge example: the 95 % upper bound, the test against 0.5 um and the normality verdict fit together', () => {
    const result = evaluate(readExample('bore-gauge-repeatability.json'));
    const bound = step(result, 'bound');
    const upper = value(bound, 'chisq.sdUpper');
    expect(upper.unit).to.equal('um');
    expect(bound.reading).to.match(/^With 90 % confidence the process sigma is at most .* um, if the measurements are independent and normal\./);
    const test = step(result, 'requirement');
    expect(test.conclusions.map((c) => c.id)).to.deep.equal(['rejectH0']);
    // The upper 95 % bound below 0.5 um and rejecting H0 (sigma = 0.5) for "less" at alpha 0.05 are the same statement.
    const upper95 = bound.tables[0].rows.find((r) => r.id === 'chi-square@0.95')!.cells.find((c) => c.id === 'sdUpper')!.value!;
    expect(test.conclusions[0].value).to.equal(upper95 < 0.5);
    const normality = bound.assumptions.find((a) => a.id === 'normality')!;
    expect(normality.checkedBy).to.equal('shape');
    expect(['not-rejected', 'rejected']).to.include(normality.status);
  });
});

describe('evaluate: derived-column and note steps', () => {
  it('non-finite values: a derived column with log(0) is an error where it is used, naming the row', () => {
    const r = evaluate(doc([
      data([1, 2, 0, 4, 5]),
      { id: 'logs', kind: 'derived-column', params: { step: 'd', name: 'lx', expression: 'log(x)' } },
      { id: 'ci', kind: 'sigma-interval', params: { source: { step: 'logs', column: 'lx' }, levels: [0.95] } },
    ]));
    expect(step(r, 'logs').status).to.equal('ok');
    expect(step(r, 'logs').warnings.map((w) => w.code)).to.include('non-finite');
    const m = expectError(r, 'ci', 'non-finite', 'params.source.column');
    expect(m).to.contain('row 3');
  });

  it('a derived column converts units and later steps use it; an expression error names the position', () => {
    const r = evaluate(doc([
      data([1.5, 2.5, 2.0, 3.0]),
      { id: 'mm', kind: 'derived-column', params: { step: 'd', name: 'x_mm', expression: 'x / 1000', unit: 'mm' } },
      { id: 's', kind: 'spread-summary', params: { source: { step: 'mm', column: 'x_mm' } } },
      { id: 'bad', kind: 'derived-column', params: { step: 'd', name: 'y', expression: 'x + nosuch' } },
    ]));
    expect(value(step(r, 's'), 'mean').value).to.be.closeTo(0.00225, 1e-15);
    expect(value(step(r, 's'), 'mean').unit).to.equal('mm');
    const m = expectError(r, 'bad', 'expression', 'params.expression');
    expect(m).to.contain('nosuch');
  });
  it('a note renders sanitized HTML with KaTeX', () => {
    const r = evaluate(doc([{ id: 'n', kind: 'note', params: { markdown: 'Sigma: $\\sigma$ <script>alert(1)</script>' } }]));
    const html = step(r, 'n').html!;
    expect(html).to.contain('katex');
    expect(html).to.not.contain('<script');
  });
});
