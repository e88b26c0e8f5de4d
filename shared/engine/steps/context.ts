/**
 * What a step runner works with: the tables left by earlier data and derived-column steps, the
 * results so far, and helpers that turn a step's `source` into validated samples, raising typed
 * errors that name the step's field.
 */
import type { Source, Step, StepKind, SummaryStatistics, Worksheet } from '../../format/worksheet';
import type { ErrorCode, StepResult } from '../result';
import { MethodInputError } from '../methods/errors';
import { Sample } from '../methods/summary';

/** A typed failure of one step: evaluate() turns it into an error result naming the step and field. */
export class StepFailure extends Error {
  constructor(
    readonly code: ErrorCode,
    readonly field: string,
    message: string,
  ) {
    super(message);
    this.name = 'StepFailure';
  }
}

export interface NumberColumnState {
  name: string;
  type: 'number';
  unit?: string;
  /** NaN where the cell is blank or not a number (see `missing`, `skipped`). */
  values: Float64Array;
  /** Blank cells. */
  missing: number;
  /** Non-blank cells that are not numbers. */
  skipped: number;
  /** Row indices (0-based) of values that are NaN or infinite although computed (derived columns). */
  nonFinite: number[];
}

export interface TextColumnState {
  name: string;
  type: 'text';
  unit?: undefined;
  values: (string | null)[];
  missing: number;
  skipped: 0;
}

export type ColumnState = NumberColumnState | TextColumnState;

export interface TableState {
  rowCount: number;
  columns: ColumnState[];
}

/** What a data or derived-column step leaves for later steps. */
export type StepData =
  | { kind: 'table'; table: TableState }
  | { kind: 'summary'; unit?: string; groups: SummaryStatistics[] };

export interface RunContext {
  worksheet: Worksheet;
  /** Significant digits of displayed values. */
  digits: number;
  /** Index of the step being run. */
  index: number;
  /** Data of earlier steps by id. */
  data: Map<string, StepData>;
  /** Results of earlier steps by id. */
  results: Map<string, StepResult>;
  /** Ids of all steps with their index (to tell "later" from "missing"). */
  stepIndex: Map<string, number>;
  /** Sample cache keyed by sample key, so the data are validated and sorted once per evaluation. */
  samples: Map<string, Sample>;
  /** Datasets passed to evaluate(), already parsed, by id. */
  datasetTable(id: string): TableState;
  /** SHA-256 hex of the worksheet: the seed of anything random. */
  seed: string;
  /** Sample keys resolved by the current step (for attaching normality verdicts). */
  usedSamples: string[];
}

/** One sample of a step's source. */
export interface ResolvedSample {
  label: string;
  /** Name of the measured column (with the group, if any) for axis titles, e.g. "bore (Line 1)". */
  quantity: string;
  /** Identity of the sample (step, column, group) for matching a normality check; null for inline summaries. */
  key: string | null;
  unit?: string;
  n: number;
  mean: number | null;
  variance: number;
  sd: number;
  /** The raw values; null for summary statistics. */
  sample: Sample | null;
  /** Cells of this sample's rows left out because they were blank or not numbers (never read as zero). */
  excluded: number;
}

export interface ResolveOptions {
  /** Field path of the source in the step (default "params.source"). */
  field?: string;
  /** Smallest n accepted for each sample (default 2). */
  minN?: number;
  /** Whether a zero variance is an error (default true). */
  allowZeroVariance?: boolean;
}

export function sampleKey(step: string, column: string, groupBy?: string, group?: string): string {
  return JSON.stringify([step, column, groupBy ?? null, group ?? null]);
}

function checkSummary(stats: SummaryStatistics, field: string, label: string, minN: number, allowZero: boolean): void {
  if (!Number.isInteger(stats.n) || stats.n < minN) {
    throw new StepFailure('insufficient-data', `${field}.n`, `${label} has n = ${stats.n}; at least ${minN} observations are needed`);
  }
  if (!Number.isFinite(stats.s) || stats.s < 0) {
    throw new StepFailure('invalid-parameter', `${field}.s`, `${label}: the standard deviation s must be a finite number ≥ 0 (got ${stats.s})`);
  }
  if (stats.s === 0 && !allowZero) {
    throw new StepFailure('zero-variance', `${field}.s`, `${label} has s = 0 (zero variance); no statement about the spread can be made`);
  }
}

function summaryToResolved(stats: SummaryStatistics, label: string, unit: string | undefined, key: string | null): ResolvedSample {
  const r: ResolvedSample = {
    label,
    quantity: label,
    key,
    n: stats.n,
    mean: stats.mean ?? null,
    variance: stats.s * stats.s,
    sd: stats.s,
    sample: null,
    excluded: 0,
  };
  if (unit !== undefined) r.unit = unit;
  return r;
}

/** Resolves `source` to its samples (one per group), checking references and data. */
export function resolveSource(ctx: RunContext, source: Source, options: ResolveOptions = {}): ResolvedSample[] {
  const field = options.field ?? 'params.source';
  const minN = options.minN ?? 2;
  const allowZero = options.allowZeroVariance ?? false;

  if ('summary' in source) {
    const list = Array.isArray(source.summary) ? source.summary : [source.summary];
    return list.map((stats, i) => {
      const f = Array.isArray(source.summary) ? `${field}.summary.${i}` : `${field}.summary`;
      const label = stats.label ?? (list.length === 1 ? 'sample' : `group ${i + 1}`);
      checkSummary(stats, f, `summary "${label}"`, minN, allowZero);
      return summaryToResolved(stats, label, source.unit, null);
    });
  }

  const data = lookupData(ctx, source.step, `${field}.step`);
  if (data.kind === 'summary') {
    let groups = data.groups.map((g, i) => ({ g, i }));
    if (source.groups) {
      groups = source.groups.map((label, j) => {
        const i = data.groups.findIndex((g, k) => (g.label ?? `group ${k + 1}`) === label);
        if (i < 0) {
          throw new StepFailure('missing-column', `${field}.groups.${j}`, `step "${source.step}" has no group "${label}" (it has ${data.groups.map((g, k) => `"${g.label ?? `group ${k + 1}`}"`).join(', ')})`);
        }
        return { g: data.groups[i], i };
      });
    }
    return groups.map(({ g, i }) => {
      const label = g.label ?? (data.groups.length === 1 ? 'sample' : `group ${i + 1}`);
      checkSummary(g, `${field}.step`, `group "${label}" of step "${source.step}"`, minN, allowZero);
      return summaryToResolved(g, label, data.unit, sampleKey(source.step, '', undefined, label));
    });
  }

  const table = data.table;
  if (source.column === undefined) {
    throw new StepFailure('missing-column', `${field}.column`, `name the column of step "${source.step}" that holds the measurements (numeric columns: ${numericNames(table)})`);
  }
  const column = findColumn(table, source.column, source.step, `${field}.column`);
  if (column.type !== 'number') {
    throw new StepFailure('invalid-parameter', `${field}.column`, `column "${source.column}" of step "${source.step}" holds text, not numbers`);
  }
  if (column.nonFinite.length > 0) {
    const row = column.nonFinite[0];
    throw new StepFailure('non-finite', `${field}.column`, `column "${source.column}" of step "${source.step}" has a value that is not a finite number in row ${row + 1} (${column.values[row]}); fix or exclude it`);
  }

  // Split into groups (order of first appearance), dropping blank and non-numeric cells. An
  // ungrouped column without blanks is used as it is (no copy): datasets may have millions of rows.
  const rows = table.rowCount;
  const groupColumn: ColumnState | null = source.groupBy !== undefined ? findColumn(table, source.groupBy, source.step, `${field}.groupBy`) : null;
  const groupNames: string[] = [];
  const groupOf = new Int32Array(groupColumn ? rows : 0);
  if (groupColumn) {
    const index = new Map<string, number>();
    for (let r = 0; r < rows; r++) {
      const raw = groupColumn.values[r];
      if (raw === null || raw === '' || (typeof raw === 'number' && Number.isNaN(raw))) {
        groupOf[r] = -1;
        continue;
      }
      const g = typeof raw === 'number' ? String(raw) : raw;
      let k = index.get(g);
      if (k === undefined) {
        k = groupNames.length;
        index.set(g, k);
        groupNames.push(g);
      }
      groupOf[r] = k;
    }
  }
  let selected: string[] = groupColumn ? groupNames : [source.column];
  if (source.groups) {
    if (!groupColumn) throw new StepFailure('invalid-parameter', `${field}.groups`, 'groups can only be selected together with groupBy');
    selected = source.groups.map((label, j) => {
      if (!groupNames.includes(label)) {
        throw new StepFailure('missing-column', `${field}.groups.${j}`, `group "${label}" does not occur in column "${source.groupBy}" of step "${source.step}" (groups: ${groupNames.slice(0, 20).map((g) => `"${g}"`).join(', ')})`);
      }
      return label;
    });
  }
  if (selected.length === 0) {
    throw new StepFailure('insufficient-data', `${field}.groupBy`, `column "${source.groupBy}" of step "${source.step}" names no groups`);
  }

  const columnValues = column.values;
  return selected.map((g) => {
    const key = sampleKey(source.step, source.column as string, source.groupBy, groupColumn ? g : undefined);
    ctx.usedSamples.push(key);
    const label = g;
    const where = groupColumn ? `group "${g}" of column "${source.column}"` : `column "${source.column}"`;
    const groupField = groupColumn ? `${field}.groupBy` : `${field}.column`;
    const k = groupColumn ? groupNames.indexOf(g) : -2;
    let count = 0;
    let excluded = 0;
    for (let r = 0; r < rows; r++) {
      if (groupColumn && groupOf[r] !== k) continue;
      if (Number.isNaN(columnValues[r])) excluded++;
      else count++;
    }
    if (count < minN) {
      throw new StepFailure('insufficient-data', groupField, `${where} of step "${source.step}" has ${count} value${count === 1 ? '' : 's'}; at least ${minN} are needed`);
    }
    let sample = ctx.samples.get(key);
    if (!sample) {
      let values: Float64Array;
      if (!groupColumn && excluded === 0 && columnValues.length === rows) {
        values = columnValues;
      } else {
        values = new Float64Array(count);
        let at = 0;
        for (let r = 0; r < rows; r++) {
          if (groupColumn && groupOf[r] !== k) continue;
          const v = columnValues[r];
          if (!Number.isNaN(v)) values[at++] = v;
        }
      }
      try {
        sample = Sample.of(values, minN);
      } catch (e) {
        if (e instanceof MethodInputError) throw new StepFailure(e.code, groupField, `${where} of step "${source.step}": ${e.message}`);
        throw e;
      }
      ctx.samples.set(key, sample);
    }
    const m = sample.moments;
    if (m.variance === 0 && !allowZero) {
      throw new StepFailure('zero-variance', groupField, `${where} of step "${source.step}" has zero variance (every value is ${m.mean}); no statement about the spread can be made`);
    }
    const quantity = groupColumn ? `${source.column} (${g})` : (source.column as string);
    const resolved: ResolvedSample = { label, quantity, key, n: m.n, mean: m.mean, variance: m.variance, sd: m.sd, sample, excluded };
    if (column.unit !== undefined) resolved.unit = column.unit;
    return resolved;
  });
}

function numericNames(table: TableState): string {
  const names = table.columns.filter((c) => c.type === 'number').map((c) => `"${c.name}"`);
  return names.length ? names.join(', ') : 'none';
}

export function findColumn(table: TableState, name: string, stepId: string, field: string): ColumnState {
  const column = table.columns.find((c) => c.name === name);
  if (!column) {
    throw new StepFailure('missing-column', field, `step "${stepId}" has no column "${name}" (columns: ${table.columns.map((c) => `"${c.name}"`).join(', ') || 'none'})`);
  }
  return column;
}

/** The data left by an earlier step, or a typed failure naming the field. */
export function lookupData(ctx: RunContext, stepId: string, field: string): StepData {
  const at = ctx.stepIndex.get(stepId);
  if (at === undefined) throw new StepFailure('missing-step', field, `there is no step "${stepId}"`);
  if (at >= ctx.index) throw new StepFailure('missing-step', field, `step "${stepId}" comes after this step; a step can only use the data of earlier steps`);
  const result = ctx.results.get(stepId);
  if (result && result.status === 'error') {
    throw new StepFailure('upstream-error', field, `step "${stepId}" has an error of its own (${result.error?.code}), so its data cannot be used`);
  }
  const data = ctx.data.get(stepId);
  if (!data) {
    const kind = ctx.worksheet.steps[at].kind;
    throw new StepFailure('wrong-step-kind', field, `step "${stepId}" is a ${kind} step and holds no data; refer to a data or derived-column step`);
  }
  return data;
}

/**
 * Runs a method call, turning its MethodInputError into a StepFailure whose field is looked up in
 * `fields` (method argument → step field path; "*" for the default).
 */
export function guard<T>(fields: Record<string, string>, run: () => T): T {
  try {
    return run();
  } catch (e) {
    if (e instanceof MethodInputError) {
      throw new StepFailure(e.code, fields[e.field] ?? fields['*'] ?? 'params', e.message);
    }
    throw e;
  }
}

export function requireLevel(value: number, field: string, what = 'confidence level'): void {
  if (!Number.isFinite(value) || value <= 0 || value >= 1) {
    throw new StepFailure('invalid-parameter', field, `the ${what} must lie strictly between 0 and 1 (got ${value})`);
  }
}

export function stepTitle(step: Step): string {
  return step.title ?? DEFAULT_TITLES[step.kind];
}

export const DEFAULT_TITLES: Record<StepKind, string> = {
  data: 'Data',
  'derived-column': 'Derived column',
  'spread-summary': 'Spread summary',
  'sigma-interval': 'Sigma interval',
  'target-test': 'Test against a required sigma',
  'two-sample-ratio': 'Ratio of two variances',
  'group-comparison': 'Comparison of groups',
  'normality-check': 'Normality check',
  'sample-size-plan': 'Sample-size plan',
  capability: 'Capability',
  note: 'Note',
};
