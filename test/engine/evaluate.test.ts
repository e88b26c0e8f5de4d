// evaluate(): the gear data through a dataset, determinism, typed errors for every bad input,
// normality verdicts, the shape of results, and the CLI. (Examples, derived columns and notes:
// evaluate-examples.test.ts.)
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import { evaluate, resultsHash, WorksheetError } from '@shared/engine/evaluate';
import { canonicalJson, sha256Hex } from '@shared/engine/hash';
import type { EvaluationResult, ResultValue, StepResult } from '@shared/engine/result';
import { ENGINE_VERSION } from '@shared/engine/version';
import { runCli } from '@shared/engine/cli';
import { expectPrinted, GEAR_ABSENT, repoRoot } from './support/check';

const examplesDir = path.join(repoRoot, 'examples');
const readExample = (file: string) => JSON.parse(readFileSync(path.join(examplesDir, file), 'utf8'));
/** An example with neither derived-column nor note steps. */
const PLAIN_EXAMPLE = 'line-capability.json';

const doc = (steps: unknown[]) => ({ format: 'spreadproof.worksheet', version: 1, title: 'test', steps });
const data = (values: (number | string | null)[], id = 'd', extra: unknown[] = []) => ({
  id, kind: 'data', params: { origin: 'inline', columns: [{ name: 'x', type: 'number', unit: 'um', values }, ...extra] },
});
const src = (column = 'x', step = 'd') => ({ step, column });
const NORMALISH = [9.8, 10.1, 10.0, 9.9, 10.3, 10.2, 9.7, 10.0, 10.1, 9.9, 10.4, 9.6];

function step(result: EvaluationResult, id: string): StepResult {
  const s = result.steps.find((r) => r.stepId === id);
  if (!s) throw new Error(`no result for ${id}`);
  return s;
}
function value(s: StepResult, id: string): ResultValue {
  const v = s.values.find((x) => x.id === id);
  if (!v) throw new Error(`no value ${id} in ${s.stepId}: ${s.values.map((x) => x.id).join(', ')}`);
  return v;
}
function expectError(result: EvaluationResult, id: string, code: string, field: string): string {
  const s = step(result, id);
  expect(s.status, `${id}: ${JSON.stringify(s.error)}`).to.equal('error');
  expect(s.error?.code).to.equal(code);
  expect(s.error?.field).to.equal(field);
  expect(s.error?.stepId).to.equal(id);
  expect(s.error?.message).to.contain(`Step "${id}"`);
  expect(s.error?.message).to.contain(field);
  return s.error!.message;
}
/** Walk every number in a result: all finite (canonicalJson would throw otherwise) and every value consistent. */
function checkValues(result: EvaluationResult): void {
  canonicalJson(result);
  for (const s of result.steps) {
    const all = [...s.values, ...s.tables.flatMap((t) => t.rows.flatMap((r) => r.cells))];
    for (const v of all) {
      if (v.value === null) {
        expect(v.reason, `${s.stepId}.${v.id}`).to.be.a('string');
        expect(v.display).to.not.match(/NaN|Infinity/);
      } else {
        expect(Number.isFinite(v.value)).to.equal(true);
        expect(v.display).to.not.match(/NaN|Infinity/);
      }
    }
  }
}

describe('evaluate: the NIST gear data as an uploaded dataset (NIST/SEMATECH e-Handbook 1.3.5.7, 1.3.5.8, 1.3.5.10)', function () {
  const file = path.resolve(repoRoot, '../shared/reference-data/nist-gear-diameter.csv');
  let bytes: Uint8Array | null = null;
  before(function () {
    try {
      bytes = readFileSync(file);
    } catch {
      console.log(`      ${GEAR_ABSENT}`);
      this.skip();
    }
  });
  it('sigma interval, target test, Bartlett and Brown-Forsythe match the handbook through evaluate()', () => {
    const id = sha256Hex(bytes!);
    const result = evaluate(doc([
      { id: 'gear', kind: 'data', params: { origin: 'dataset', datasetId: id, columns: [{ name: 'diameter', unit: 'in' }] } },
      { id: 'ci', kind: 'sigma-interval', params: { source: { step: 'gear', column: 'diameter' }, levels: [0.95, 0.9, 0.99] } },
      { id: 't', kind: 'target-test', params: { source: { step: 'gear', column: 'diameter' }, sigma0: 0.1 } },
      { id: 'g', kind: 'group-comparison', params: { source: { step: 'gear', column: 'diameter', groupBy: 'batch' } } },
    ]), { [id]: bytes! });
    checkValues(result);
    const ci = step(result, 'ci');
    expectPrinted(value(ci, 'chisq.sdLower').value!, '0.005513', 'sigma lower 95 %');
    expectPrinted(value(ci, 'chisq.sdUpper').value!, '0.007294', 'sigma upper 95 %');
    expectPrinted(value(ci, 'bonett.sdLower').value!, '0.005262', 'Bonett lower (REFERENCES, computed)');
    expect(value(ci, 'chisq.sdUpper').display).to.equal('0.007294');
    expect(value(ci, 'chisq.sdUpper').unit).to.equal('in');
    const t = step(result, 't');
    expectPrinted(value(t, 'statistic').value!, '0.390304', 'T');
    expect(t.conclusions.find((c) => c.id === 'rejectH0')!.value).to.equal(true);
    const g = step(result, 'g');
    expectPrinted(value(g, 'bartlett').value!, '20.78587', 'Bartlett');
    expectPrinted(value(g, 'brownForsythe').value!, '1.7059177', 'Brown-Forsythe');
    expect(g.conclusions.find((c) => c.id === 'bartlettRejects')!.value).to.equal(true);
    expect(g.conclusions.find((c) => c.id === 'brownForsytheRejects')!.value).to.equal(false);
    expect(g.tables.find((tb) => tb.id === 'anova')!.rows.map((r) => r.id)).to.deep.equal(['between', 'within', 'total']);
  });
});

describe('evaluate: determinism and hashing', function () {
  // The second process starts tsx and loads the engine (math.js included): slow on a loaded machine.
  this.timeout(180_000);
  it('the same document gives byte-identical canonical JSON, twice in one process and in another process', () => {
    const file = path.join(examplesDir, PLAIN_EXAMPLE);
    const a = canonicalJson(evaluate(readExample(PLAIN_EXAMPLE)));
    const b = canonicalJson(evaluate(readExample(PLAIN_EXAMPLE)));
    expect(a).to.equal(b);
    const child = spawnSync(process.execPath, ['--import', 'tsx', path.join(repoRoot, 'shared/engine/cli.ts'), file, '--canonical'], { cwd: repoRoot, encoding: 'utf8' });
    expect(child.status, child.stderr).to.equal(0);
    expect(sha256Hex(child.stdout.trimEnd())).to.equal(sha256Hex(a));
  });
  it('results carry the engine version and the worksheet hash; resultsHash is the SHA-256 of the canonical JSON', () => {
    const r = evaluate(readExample(PLAIN_EXAMPLE));
    expect(r.engineVersion).to.equal(ENGINE_VERSION);
    expect(r.worksheetHash).to.match(/^[0-9a-f]{64}$/);
    expect(resultsHash(r)).to.equal(sha256Hex(canonicalJson(r)));
    const changed = readExample(PLAIN_EXAMPLE);
    changed.title += ' (copy)';
    expect(evaluate(changed).worksheetHash).to.not.equal(r.worksheetHash);
  });
});

describe('evaluate: bad input gives typed errors naming the step and the field', function () {
  this.timeout(30_000);
  it('a structurally invalid document throws WorksheetError listing the fields', () => {
    expect(() => evaluate({ format: 'spreadproof.worksheet', version: 1, steps: [] })).to.throw(WorksheetError, /title/);
    try {
      evaluate(doc([{ id: 'ci', kind: 'sigma-interval', params: { source: src(), levels: 'high' } }]));
      expect.fail('no error');
    } catch (e) {
      expect(e).to.be.instanceOf(WorksheetError);
      expect((e as WorksheetError).issues[0].field).to.equal('steps.0.params.levels');
    }
  });

  it('n < 2: a column with one value', () => {
    const r = evaluate(doc([data([5]), { id: 'ci', kind: 'sigma-interval', params: { source: src(), levels: [0.95] } }]));
    const m = expectError(r, 'ci', 'insufficient-data', 'params.source.column');
    expect(m).to.contain('has 1 value; at least 2 are needed');
  });

  it('n < 2: summary statistics with n = 1', () => {
    const r = evaluate(doc([{ id: 't', kind: 'target-test', params: { source: { summary: { n: 1, s: 2 } }, sigma0: 1 } }]));
    expectError(r, 't', 'insufficient-data', 'params.source.summary.n');
  });

  it('zero variance', () => {
    const r = evaluate(doc([data([3, 3, 3, 3]), { id: 'ci', kind: 'sigma-interval', params: { source: src(), levels: [0.95] } }, { id: 's', kind: 'spread-summary', params: { source: src() } }]));
    const m = expectError(r, 'ci', 'zero-variance', 'params.source.column');
    expect(m).to.contain('zero variance');
    // the spread summary still reports it, with a warning
    expect(step(r, 's').status).to.equal('ok');
    expect(value(step(r, 's'), 'sd').value).to.equal(0);
    expect(step(r, 's').warnings.map((w) => w.code)).to.include('zero-variance');
  });

  it('non-finite values: a parsed table holding Infinity', () => {
    const id = 'a'.repeat(64);
    const table = { columns: [{ name: 'x', type: 'number' as const, values: Float64Array.from([1, 2, Infinity, 4]), missing: 0 }], rowCount: 4, delimiter: ',' as const, decimalComma: false, hasHeader: true, skipped: [], skippedCount: 0, encoding: 'utf-8' as const };
    const r = evaluate(doc([{ id: 'd', kind: 'data', params: { origin: 'dataset', datasetId: id } }, { id: 's', kind: 'spread-summary', params: { source: src() } }]), { [id]: table });
    const m = expectError(r, 's', 'non-finite', 'params.source.column');
    expect(m).to.contain('value 3 is Infinity');
  });

  it('confidence level outside (0, 1): 0, 1, 1.2 and -0.5 each name the index', () => {
    for (const [levels, index] of [[[0.95, 1.2], 1], [[0], 0], [[1], 0], [[0.9, 0.95, -0.5], 2]] as const) {
      const r = evaluate(doc([data(NORMALISH), { id: 'ci', kind: 'sigma-interval', params: { source: src(), levels } }]));
      const m = expectError(r, 'ci', 'invalid-parameter', `params.levels.${index}`);
      expect(m).to.contain('must lie strictly between 0 and 1');
    }
    const cap = evaluate(doc([data(NORMALISH), { id: 'c', kind: 'capability', params: { source: src(), lsl: 9, usl: 11, level: 1.5 } }]));
    expectError(cap, 'c', 'invalid-parameter', 'params.level');
  });

  it('sigma0 ≤ 0', () => {
    for (const sigma0 of [0, -1]) {
      const r = evaluate(doc([data(NORMALISH), { id: 't', kind: 'target-test', params: { source: src(), sigma0 } }]));
      const m = expectError(r, 't', 'invalid-parameter', 'params.sigma0');
      expect(m).to.contain(`got ${sigma0}`);
    }
  });

  it('reversed specification limits', () => {
    const r = evaluate(doc([data(NORMALISH), { id: 'c', kind: 'capability', params: { source: src(), lsl: 11, usl: 9 } }]));
    const m = expectError(r, 'c', 'invalid-parameter', 'params.lsl');
    expect(m).to.contain('(11) must be below the upper specification limit (9)');
  });

  it('a group with fewer than 2 values', () => {
    const r = evaluate(doc([
      data([1, 2, 3, 4, 5, 6], 'd', [{ name: 'g', type: 'text', values: ['a', 'a', 'a', 'b', 'c', 'c'] }]),
      { id: 'cmp', kind: 'group-comparison', params: { source: { step: 'd', column: 'x', groupBy: 'g' } } },
    ]));
    const m = expectError(r, 'cmp', 'insufficient-data', 'params.source.groupBy');
    expect(m).to.contain('group "b" of column "x"');
  });

  it('a reference to a missing step, a later step, a missing column, a missing group column; other steps still evaluate', () => {
    const r = evaluate(doc([
      data(NORMALISH),
      { id: 'a', kind: 'spread-summary', params: { source: { step: 'nowhere', column: 'x' } } },
      { id: 'b', kind: 'spread-summary', params: { source: { step: 'd', column: 'y' } } },
      { id: 'c', kind: 'spread-summary', params: { source: { step: 'late', column: 'x' } } },
      { id: 'e', kind: 'spread-summary', params: { source: { step: 'd', column: 'x', groupBy: 'shift' } } },
      { id: 'ok', kind: 'spread-summary', params: { source: src() } },
      data([1, 2, 3], 'late'),
    ]));
    expect(expectError(r, 'a', 'missing-step', 'params.source.step')).to.contain('there is no step "nowhere"');
    expect(expectError(r, 'b', 'missing-column', 'params.source.column')).to.contain('step "d" has no column "y" (columns: "x")');
    expect(expectError(r, 'c', 'missing-step', 'params.source.step')).to.contain('comes after this step');
    expectError(r, 'e', 'missing-column', 'params.source.groupBy');
    expect(step(r, 'ok').status).to.equal('ok');
    expect(r.counts).to.deep.equal({ ok: 3, error: 4 });
  });

  it('a step using a failed step reports an upstream error', () => {
    const r = evaluate(doc([
      data([1, 2], 'd', [{ name: 'y', type: 'number', values: [1] }]),
      { id: 's', kind: 'spread-summary', params: { source: src() } },
    ]));
    expectError(r, 'd', 'invalid-parameter', 'params.columns.1.values');
    expect(expectError(r, 's', 'upstream-error', 'params.source.step')).to.contain('step "d" has an error');
  });

  it('a missing dataset and bytes that do not match their id', () => {
    const id = sha256Hex('x\n1\n2\n3\n');
    const step0 = { id: 'd', kind: 'data', params: { origin: 'dataset', datasetId: id } };
    expectError(evaluate(doc([step0])), 'd', 'missing-dataset', 'params.datasetId');
    expectError(evaluate(doc([step0]), { [id]: 'x\n1\n2\n4\n' }), 'd', 'invalid-dataset', 'params.datasetId');
    const ok = evaluate(doc([step0, { id: 's', kind: 'spread-summary', params: { source: src() } }]), { [id]: 'x\n1\n2\n3\n' });
    expect(value(step(ok, 's'), 'mean').value).to.equal(2);
  });

  it('blank and non-numeric cells are counted and left out, never read as zero', () => {
    const r = evaluate(doc([data([1, null, 2, 'n/a', 3, '']), { id: 's', kind: 'spread-summary', params: { source: src() } }]));
    expect(step(r, 'd').data!.columns[0]).to.include({ count: 3, missing: 2, skipped: 1 });
    expect(step(r, 'd').warnings.map((w) => w.code)).to.include('skipped-cells');
    const s = step(r, 's');
    expect(value(s, 'n').value).to.equal(3);
    expect(value(s, 'excluded').value).to.equal(3);
    expect(value(s, 'mean').value).to.equal(2);
  });
});

describe('evaluate: normality verdicts, summaries, result shape', function () {
  this.timeout(30_000);
  // Strongly skewed data (invented): Shapiro-Wilk rejects normality.
  const skewed = [0.1, 0.1, 0.2, 0.2, 0.2, 0.3, 0.3, 0.4, 0.5, 0.7, 0.9, 1.4, 2.2, 3.9, 7.5];
  it('a rejecting normality check becomes a warning with the robust alternative on the steps using the same data', () => {
    const r = evaluate(doc([
      data(skewed),
      { id: 'ci', kind: 'sigma-interval', params: { source: src(), levels: [0.95] } },
      { id: 'norm', kind: 'normality-check', params: { source: src() } },
      { id: 'plan', kind: 'sample-size-plan', params: { plan: { goal: 'interval-ratio', ratio: 2 } } },
    ]));
    const norm = step(r, 'norm');
    expect(norm.conclusions.find((c) => c.id === 'normalityRejected')!.value).to.equal(true);
    const ci = step(r, 'ci');
    const w = ci.warnings.find((x) => x.code === 'normality-rejected')!;
    expect(w.fromStep).to.equal('norm');
    expect(w.message).to.contain("Bonett's interval");
    expect(ci.assumptions.find((a) => a.id === 'normality')).to.include({ status: 'rejected', checkedBy: 'norm' });
    expect(step(r, 'plan').warnings).to.deep.equal([]);
  });

  it('Shapiro-Wilk beyond n = 5000 is "not applicable" with the reason; Anderson-Darling still runs', () => {
    const values = Array.from({ length: 5001 }, (_, i) => Math.sin(i) + (i % 7) / 10);
    const r = evaluate(doc([data(values), { id: 'norm', kind: 'normality-check', params: { source: src() } }]));
    const norm = step(r, 'norm');
    expect(norm.status).to.equal('ok');
    const w = value(norm, 'shapiroW');
    expect(w.value).to.equal(null);
    expect(w.display).to.equal('not available');
    expect(w.reason).to.contain('3 ≤ n ≤ 5000');
    expect(value(norm, 'andersonP').value).to.be.a('number');
  });

  it('summary statistics: chi-square interval given, Bonett "not available" with the reason (NIST 7.2.3 wafers)', () => {
    const r = evaluate(doc([{ id: 'ci', kind: 'sigma-interval', params: { source: { summary: { n: 10, s: 13.97 } }, levels: [0.95] } }]));
    const ci = step(r, 'ci');
    expect(ci.status).to.equal('ok');
    expect(value(ci, 'bonett.sdLower').reason).to.contain('individual values');
    expect(value(ci, 'chisq.sdUpper').value).to.be.above(13.97);
  });

  it('every result has the documented fields; formulas have symbolic and substituted LaTeX', () => {
    const r = evaluate(readExample('line-capability.json'));
    for (const s of r.steps) {
      expect(Object.keys(s).sort()).to.deep.equal(['assumptions', 'caution', 'conclusions', 'data', 'error', 'formulas', 'html', 'kind', 'plot', 'reading', 'sources', 'status', 'stepId', 'tables', 'title', 'values', 'warnings']);
      for (const f of s.formulas) {
        expect(f.symbolic.length).to.be.above(0);
        expect(f.substituted).to.match(/\d/);
      }
    }
    const cap = step(r, 'line1');
    expect(cap.conclusions.map((c) => c.id)).to.include('cpkLowerBoundAtLeast1.33');
    expect(value(cap, 'k2').value).to.be.above(value(cap, 'k2Howe').value! - 0.1);
  });

  it('display values use the stated significant digits and carry units', () => {
    const d4 = evaluate(doc([data(NORMALISH), { id: 's', kind: 'spread-summary', params: { source: src() } }]));
    const sd = value(step(d4, 's'), 'sd');
    expect(sd.digits).to.equal(4);
    expect(sd.display).to.equal(sd.value!.toPrecision(4));
    expect(sd.unit).to.equal('um');
    expect(value(step(d4, 's'), 'variance').unit).to.equal('um²');
    const d7 = evaluate({ ...doc([data(NORMALISH), { id: 's', kind: 'spread-summary', params: { source: src() } }]), display: { digits: 7 } });
    expect(value(step(d7, 's'), 'sd').display).to.equal(sd.value!.toPrecision(7));
  });

});

describe('CLI: npm run evaluate -- <worksheet.json> [--data <file> ...]', function () {
  this.timeout(30_000);
  it('prints results JSON and exits 0 for a good worksheet', () => {
    const out = runCli([path.join(examplesDir, PLAIN_EXAMPLE)]);
    expect(out.code).to.equal(0);
    expect(JSON.parse(out.stdout).format).to.equal('spreadproof.results');
    expect(out.stderr).to.match(/results hash [0-9a-f]{64}/);
  });
  it('exits 2 with a clear message on a bad document, a missing file or bad usage', () => {
    const bad = runCli(['bad.json'], () => new TextEncoder().encode('{"format":"spreadproof.worksheet","version":1,"steps":[]}'));
    expect(bad.code).to.equal(2);
    expect(bad.stderr).to.contain('is not a valid worksheet');
    expect(bad.stderr).to.contain('title');
    const notJson = runCli(['x.json'], () => new TextEncoder().encode('{oops'));
    expect(notJson.code).to.equal(2);
    expect(notJson.stderr).to.contain('cannot read x.json as JSON');
    expect(runCli([]).code).to.equal(2);
    expect(runCli(['a.json', '--data']).code).to.equal(2);
  });
  it('registers --data files under their SHA-256 and exits 1 when a step has an error', () => {
    const csv = new TextEncoder().encode('x\n1\n2\n4\n');
    const id = sha256Hex(csv);
    const worksheet = JSON.stringify(doc([
      { id: 'd', kind: 'data', params: { origin: 'dataset', datasetId: id } },
      { id: 's', kind: 'spread-summary', params: { source: src() } },
      { id: 't', kind: 'target-test', params: { source: src(), sigma0: -1 } },
    ]));
    const files: Record<string, Uint8Array> = { 'w.json': new TextEncoder().encode(worksheet), 'x.csv': csv };
    const out = runCli(['w.json', '--data', 'x.csv'], (p) => files[p]);
    expect(out.code).to.equal(1);
    const parsed = JSON.parse(out.stdout) as EvaluationResult;
    expect(parsed.steps[1].status).to.equal('ok');
    expect(out.stderr).to.contain('Step "t", params.sigma0');
  });
});
