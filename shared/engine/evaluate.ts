/**
 * evaluate(document, datasets) → EvaluationResult: every step of a worksheet, in order.
 *
 * - `document`: an untrusted value (parsed JSON). It is validated with the worksheet schema; a
 *   structurally bad document throws WorksheetError (name "WorksheetError") listing the fields.
 * - `datasets`: the uploaded files that data steps refer to by SHA-256 id, as raw bytes, text, or
 *   a table already parsed with parseTable. Bytes and text are checked against their id.
 *
 * One result per step, in document order. A step with bad parameters or a reference to a missing
 * step or column gets status "error" with a typed error naming the step and the field; the other
 * steps still evaluate (those that use its data report an upstream error).
 *
 * Pure and deterministic: no clock, no I/O, no unseeded randomness; steps and groups run in a fixed
 * order; the same input gives byte-identical canonicalJson(result) in any process.
 */
import { parseWorksheet, type FormatIssue, type Step, type Worksheet } from '../format/worksheet';
import { canonicalHash, canonicalJson, sha256Hex } from './hash';
import { emptyResult, errorResult, RESULTS_FORMAT, type EvaluationResult, type StepResult } from './result';
import { RUNNERS, NORMALITY_ALTERNATIVES, type Runner } from './steps/index';
import { StepFailure, stepTitle, type RunContext, type StepData, type TableState } from './steps/context';
import type { NormalityVerdict } from './steps/normality-check';
import { parseTable, TableParseError, type Table } from './table/parse';
import { ENGINE_VERSION } from './version';

export type DatasetInput = Uint8Array | string | Table;
export type Datasets = Readonly<Record<string, DatasetInput>> | ReadonlyMap<string, DatasetInput>;

/** A document that is not a valid worksheet. */
export class WorksheetError extends Error {
  override readonly name = 'WorksheetError';
  constructor(readonly issues: FormatIssue[]) {
    super(`Not a valid Spreadproof worksheet: ${issues.slice(0, 5).map((i) => `${i.field}: ${i.message}`).join('; ')}${issues.length > 5 ? ` (and ${issues.length - 5} more)` : ''}`);
  }
}

export function evaluate(document: unknown, datasets: Datasets = {}): EvaluationResult {
  const parsed = parseWorksheet(document);
  if (!parsed.ok) throw new WorksheetError(parsed.issues);
  const worksheet = parsed.worksheet;
  const worksheetHash = canonicalHash(worksheet);
  const lookup = (id: string): DatasetInput | undefined =>
    datasets instanceof Map ? datasets.get(id) : Object.prototype.hasOwnProperty.call(datasets, id) ? (datasets as Record<string, DatasetInput>)[id] : undefined;
  const parsedDatasets = new Map<string, TableState>();

  const ctx: RunContext = {
    worksheet,
    digits: worksheet.display?.digits ?? 4,
    index: 0,
    data: new Map<string, StepData>(),
    results: new Map<string, StepResult>(),
    stepIndex: new Map(worksheet.steps.map((s, i) => [s.id, i])),
    samples: new Map(),
    seed: worksheetHash,
    usedSamples: [],
    datasetTable(id: string): TableState {
      const cached = parsedDatasets.get(id);
      if (cached) return cached;
      const table = datasetToTable(id, lookup(id));
      parsedDatasets.set(id, table);
      return table;
    },
  };

  const results: StepResult[] = [];
  const usedByStep = new Map<string, string[]>();
  const verdicts: NormalityVerdict[] = [];
  worksheet.steps.forEach((step, index) => {
    ctx.index = index;
    ctx.usedSamples = [];
    const result = runStep(step, ctx);
    const output = result.output;
    if (output && 'sampleKey' in output) verdicts.push(output);
    else if (output && 'kind' in output) ctx.data.set(step.id, output);
    usedByStep.set(step.id, [...new Set(ctx.usedSamples)]);
    ctx.results.set(step.id, result.result);
    results.push(result.result);
  });
  attachNormalityVerdicts(results, usedByStep, verdicts);

  return {
    format: RESULTS_FORMAT,
    engineVersion: ENGINE_VERSION,
    worksheetHash,
    steps: results,
    counts: { ok: results.filter((r) => r.status === 'ok').length, error: results.filter((r) => r.status === 'error').length },
  };
}

/** SHA-256 of the canonical JSON of a result: the results hash stored with a revision. */
export function resultsHash(result: EvaluationResult): string {
  return canonicalHash(result);
}

function runStep(step: Step, ctx: RunContext): { result: StepResult; output: StepData | NormalityVerdict | null } {
  const title = stepTitle(step);
  const result = emptyResult(step.id, step.kind, title);
  try {
    const runner = RUNNERS[step.kind] as Runner<typeof step.kind>;
    const output = runner(step as never, ctx, result) ?? null;
    // Every number in a result must be finite; canonicalJson refuses anything else. A failure here
    // is a defect of the engine, reported as such rather than shown as a number.
    canonicalJson(result);
    return { result, output };
  } catch (e) {
    if (e instanceof StepFailure) {
      return {
        result: errorResult(step.id, step.kind, title, {
          code: e.code,
          stepId: step.id,
          field: e.field,
          message: `Step "${step.id}", ${e.field}: ${e.message}`,
        }),
        output: null,
      };
    }
    const detail = e instanceof Error ? e.message : String(e);
    return {
      result: errorResult(step.id, step.kind, title, {
        code: 'internal',
        stepId: step.id,
        field: 'params',
        message: `Step "${step.id}": the engine failed on this step (${detail}). This is a defect of Spreadproof; please report it with the worksheet.`,
      }),
      output: null,
    };
  }
}

function datasetToTable(id: string, input: DatasetInput | undefined): TableState {
  if (input === undefined) {
    throw new StepFailure('missing-dataset', 'params.datasetId', `no dataset with id ${id.slice(0, 12)}… was supplied; upload the file again or pass it with --data`);
  }
  let table: Table;
  if (typeof input === 'string' || input instanceof Uint8Array) {
    const actual = sha256Hex(input);
    if (actual !== id) {
      throw new StepFailure('invalid-dataset', 'params.datasetId', `the file supplied for dataset ${id.slice(0, 12)}… has SHA-256 ${actual.slice(0, 12)}…; it is not the file the worksheet refers to`);
    }
    try {
      table = parseTable(input);
    } catch (e) {
      if (e instanceof TableParseError) {
        const where = e.line !== undefined ? ` (line ${e.line}${e.column !== undefined ? `, column ${e.column}` : ''})` : '';
        throw new StepFailure('invalid-dataset', 'params.datasetId', `the dataset cannot be read${where}: ${e.message}`);
      }
      throw e;
    }
  } else {
    table = input;
  }
  return {
    rowCount: table.rowCount,
    columns: table.columns.map((c) =>
      c.type === 'number'
        ? { name: c.name, type: 'number', values: c.values, missing: c.missing, skipped: 0, nonFinite: [] }
        : { name: c.name, type: 'text', values: c.values.map((v) => (v === '' ? null : v)), missing: c.missing, skipped: 0 },
    ),
  };
}

/**
 * A normality check's verdict goes to every step that relies on normality and uses one of the
 * samples it checked: the step's "normality" assumption gets the check status, and a rejection
 * adds a warning with the robust alternative.
 */
function attachNormalityVerdicts(results: StepResult[], usedByStep: Map<string, string[]>, verdicts: NormalityVerdict[]): void {
  if (verdicts.length === 0) return;
  for (const result of results) {
    const alternative = NORMALITY_ALTERNATIVES[result.kind];
    if (result.status !== 'ok' || !alternative) continue;
    const used = usedByStep.get(result.stepId) ?? [];
    const relevant = verdicts.filter((v) => used.includes(v.sampleKey));
    if (relevant.length === 0) continue;
    const assumption = result.assumptions.find((a) => a.id === 'normality');
    const rejected = relevant.filter((v) => v.rejected);
    const checkedAll = used.every((key) => relevant.some((v) => v.sampleKey === key));
    if (rejected.length > 0) {
      if (assumption) {
        assumption.status = 'rejected';
        assumption.checkedBy = rejected[0].stepId;
        assumption.detail = rejected.map((v) => `${v.stepId}: ${v.detail}`).join('; ');
      }
      for (const v of rejected) {
        result.warnings.push({ code: 'normality-rejected', fromStep: v.stepId, message: `Normality check "${v.stepId}" finds the data not normal (${v.detail}). ${alternative}` });
      }
    } else if (assumption && checkedAll) {
      assumption.status = 'not-rejected';
      assumption.checkedBy = relevant[0].stepId;
      assumption.detail = relevant.map((v) => `${v.stepId}: ${v.detail}`).join('; ');
    } else if (assumption) {
      assumption.detail = `checked for part of the data only (${relevant.map((v) => v.stepId).join(', ')})`;
    }
  }
}

export type { Worksheet };
