// Comparison of two revisions of a worksheet (or of a fork and its origin), as JSON the client
// renders directly: which steps were added, removed, moved or changed (parameter by parameter),
// how the data changed (rows added or removed, column summaries), how each numeric result moved
// (old → new with relative change) and which named conclusions flipped.
//
// Steps are matched by their stable id. A step counts as moved when it is not part of a longest
// common subsequence of the ids both revisions share, i.e. the smallest set of steps whose
// relocation explains the new order.
import type { EvaluationResult, StepResult } from '../engine/result';
import type { Step, Worksheet } from '../format/worksheet';
import { type LeafChange, jsonEqual, leafChanges, longestCommonSubsequence, relativeChange, rowMultisetChange } from './diff';

/** A column-oriented table: inline data of a data step, or a parsed uploaded dataset. */
export interface TableLike {
  rowCount: number;
  columns: readonly { name: string; type: 'number' | 'text'; values: ArrayLike<number | string | null> }[];
}

export interface ComparableRevision {
  document: Worksheet;
  /** The engine's results as stored (parsed canonical JSON). */
  results: unknown;
  contentHash?: string;
}

export interface CompareOptions {
  /** Parsed uploaded datasets by id, for data steps that refer to one. Missing ones are compared by id only. */
  datasets?: Readonly<Record<string, TableLike | undefined>>;
}

export type StepChangeKind = 'added' | 'removed' | 'moved' | 'changed' | 'moved_and_changed';

export interface StepChange {
  stepId: string;
  kind: string;
  label: string;
  change: StepChangeKind;
  fromIndex: number | null;
  toIndex: number | null;
  /** Leaf-by-leaf parameter changes (title and kind included); empty for added, removed and pure moves. */
  params: LeafChange[];
}

export interface ColumnSummary {
  type: 'number' | 'text';
  n: number;
  missing: number;
  mean: number | null;
  sd: number | null;
  min: number | null;
  max: number | null;
}

export interface ColumnChange {
  name: string;
  change: 'added' | 'removed' | 'changed' | 'same';
  from: ColumnSummary | null;
  to: ColumnSummary | null;
}

export interface DataChange {
  stepId: string;
  label: string;
  /** Where the data came from on each side: inline, dataset or summary. */
  originFrom: string;
  originTo: string;
  datasetFrom: string | null;
  datasetTo: string | null;
  /** Null when a side's table is not available (a summary-statistics step, an unloaded dataset). */
  rowsFrom: number | null;
  rowsTo: number | null;
  rowsAdded: number | null;
  rowsRemoved: number | null;
  columns: ColumnChange[];
}

export interface ResultChange {
  stepId: string;
  /** The step's label (title, or kind and id). */
  label: string;
  /** `values.<valueId>` or `tables.<tableId>.<rowId>.<cellId>` inside the step's result. */
  path: string;
  /** What the number is, e.g. "Upper bound of sigma" or "Intervals: 95 %, upper". */
  name: string;
  /** Full-precision values; null when not available on that side. */
  from: number | null;
  to: number | null;
  /** The engine's display strings (significant digits), null when the value is absent on that side. */
  fromDisplay: string | null;
  toDisplay: string | null;
  /** (to − from) / |from|; null when from is 0 or a side is missing. */
  relativeChange: number | null;
  unit?: string;
}

export interface ConclusionChange {
  stepId: string;
  label: string;
  /** The conclusion's id in the step result (e.g. `rejectH0`), or `status` for ok ↔ error. */
  id: string;
  statement: string;
  from: boolean | null;
  to: boolean | null;
  /** True when the conclusion exists on both sides and changed value. */
  flipped: boolean;
}

export interface CompareResult {
  identical: boolean;
  title: null | { from: string; to: string };
  steps: StepChange[];
  data: DataChange[];
  results: ResultChange[];
  conclusions: ConclusionChange[];
  summary: {
    added: number;
    removed: number;
    moved: number;
    changed: number;
    dataChanged: number;
    resultsChanged: number;
    conclusionsFlipped: number;
  };
}

export function stepLabel(step: Pick<Step, 'id' | 'kind' | 'title'>): string {
  return step.title && step.title.trim() !== '' ? step.title : `${step.kind} ${step.id}`;
}

/** Compares `from` (older, left) with `to` (newer, right). Pure; the same inputs give the same JSON. */
export function compareRevisions(from: ComparableRevision, to: ComparableRevision, options: CompareOptions = {}): CompareResult {
  const fromSteps = from.document.steps;
  const toSteps = to.document.steps;
  const fromIndex = new Map(fromSteps.map((s, i) => [s.id, i]));
  const toIndex = new Map(toSteps.map((s, i) => [s.id, i]));

  const sharedInFromOrder = fromSteps.filter((s) => toIndex.has(s.id)).map((s) => s.id);
  const sharedInToOrder = toSteps.filter((s) => fromIndex.has(s.id)).map((s) => s.id);
  const kept = longestCommonSubsequence(sharedInFromOrder, sharedInToOrder);

  const steps: StepChange[] = [];
  for (const [i, step] of toSteps.entries()) {
    const j = fromIndex.get(step.id);
    if (j === undefined) {
      steps.push({ stepId: step.id, kind: step.kind, label: stepLabel(step), change: 'added', fromIndex: null, toIndex: i, params: [] });
      continue;
    }
    const old = fromSteps[j];
    const params = stepParamChanges(old, step);
    const moved = !kept.has(step.id);
    if (!moved && params.length === 0) continue;
    steps.push({
      stepId: step.id,
      kind: step.kind,
      label: stepLabel(step),
      change: moved ? (params.length > 0 ? 'moved_and_changed' : 'moved') : 'changed',
      fromIndex: j,
      toIndex: i,
      params,
    });
  }
  for (const [j, step] of fromSteps.entries()) {
    if (!toIndex.has(step.id)) {
      steps.push({ stepId: step.id, kind: step.kind, label: stepLabel(step), change: 'removed', fromIndex: j, toIndex: null, params: [] });
    }
  }

  const data: DataChange[] = [];
  for (const step of toSteps) {
    const j = fromIndex.get(step.id);
    if (j === undefined) continue;
    const old = fromSteps[j];
    if (old.kind !== 'data' || step.kind !== 'data') continue;
    const change = dataChange(old, step, options);
    if (change) data.push(change);
  }

  const { results, conclusions } = resultChanges(from, to);
  const titleChanged = from.document.title !== to.document.title;

  const identical =
    from.contentHash !== undefined && to.contentHash !== undefined
      ? from.contentHash === to.contentHash
      : jsonEqual(from.document, to.document);

  return {
    identical,
    title: titleChanged ? { from: from.document.title, to: to.document.title } : null,
    steps,
    data,
    results,
    conclusions,
    summary: {
      added: steps.filter((s) => s.change === 'added').length,
      removed: steps.filter((s) => s.change === 'removed').length,
      moved: steps.filter((s) => s.change === 'moved' || s.change === 'moved_and_changed').length,
      changed: steps.filter((s) => s.change === 'changed' || s.change === 'moved_and_changed').length,
      dataChanged: data.length,
      resultsChanged: results.length,
      conclusionsFlipped: conclusions.filter((c) => c.flipped).length,
    },
  };
}

/** Parameter changes of one step; the cell values of inline data are reported as data changes instead. */
function stepParamChanges(a: Step, b: Step): LeafChange[] {
  const strip = (s: Step) => ({ kind: s.kind, title: s.title, params: s.params });
  const skipCells = (path: string) => /^params\.columns\.\d+\.values$/.test(path);
  return leafChanges(strip(a), strip(b), skipCells);
}

type DataStep = Extract<Step, { kind: 'data' }>;

function inlineTable(step: DataStep): TableLike | null {
  if (step.params.origin !== 'inline') return null;
  const columns = step.params.columns;
  const rowCount = columns.reduce((m, c) => Math.max(m, c.values.length), 0);
  return { rowCount, columns: columns.map((c) => ({ name: c.name, type: c.type, values: c.values })) };
}

function tableOf(step: DataStep, options: CompareOptions): TableLike | null {
  if (step.params.origin === 'inline') return inlineTable(step);
  if (step.params.origin === 'dataset') return options.datasets?.[step.params.datasetId] ?? null;
  return null;
}

function dataChange(a: DataStep, b: DataStep, options: CompareOptions): DataChange | null {
  const datasetFrom = a.params.origin === 'dataset' ? a.params.datasetId : null;
  const datasetTo = b.params.origin === 'dataset' ? b.params.datasetId : null;
  if (a.params.origin === b.params.origin) {
    if (a.params.origin === 'dataset' && datasetFrom === datasetTo) return null;
    if (a.params.origin !== 'dataset' && jsonEqual(a.params, b.params)) return null;
  }
  const ta = tableOf(a, options);
  const tb = tableOf(b, options);

  let rowsAdded: number | null = null;
  let rowsRemoved: number | null = null;
  if (ta && tb) {
    const names = [...new Set([...ta.columns.map((c) => c.name), ...tb.columns.map((c) => c.name)])].sort();
    const change = rowMultisetChange(rowKeys(ta, names), rowKeys(tb, names));
    rowsAdded = change.added;
    rowsRemoved = change.removed;
  }

  const columns: ColumnChange[] = [];
  const colsA = new Map((ta?.columns ?? []).map((c) => [c.name, c]));
  const colsB = new Map((tb?.columns ?? []).map((c) => [c.name, c]));
  for (const name of [...new Set([...colsA.keys(), ...colsB.keys()])]) {
    const ca = colsA.get(name);
    const cb = colsB.get(name);
    const sa = ca ? columnSummary(ca.type, ca.values) : null;
    const sb = cb ? columnSummary(cb.type, cb.values) : null;
    const change: ColumnChange['change'] = !ca ? 'added' : !cb ? 'removed' : sameColumn(ca.values, cb.values) && ca.type === cb.type ? 'same' : 'changed';
    columns.push({ name, change, from: sa, to: sb });
  }
  if (a.params.origin === 'summary' || b.params.origin === 'summary') {
    // Summary statistics carry no rows; their parameter changes are listed with the step.
    for (const [side, step] of [['from', a], ['to', b]] as const) {
      if (step.params.origin !== 'summary') continue;
      for (const group of step.params.groups) {
        const name = group.label ?? '(summary)';
        const summary: ColumnSummary = { type: 'number', n: group.n, missing: 0, mean: group.mean ?? null, sd: group.s, min: null, max: null };
        const existing = columns.find((c) => c.name === name);
        if (existing) existing[side] = summary;
        else columns.push({ name, change: 'changed', from: side === 'from' ? summary : null, to: side === 'to' ? summary : null });
      }
    }
    for (const c of columns) {
      c.change = !c.from ? 'added' : !c.to ? 'removed' : jsonEqual(c.from, c.to) ? 'same' : 'changed';
    }
  }

  return {
    stepId: b.id,
    label: stepLabel(b),
    originFrom: a.params.origin,
    originTo: b.params.origin,
    datasetFrom,
    datasetTo,
    rowsFrom: ta?.rowCount ?? null,
    rowsTo: tb?.rowCount ?? null,
    rowsAdded,
    rowsRemoved,
    columns,
  };
}

function cell(value: number | string | null | undefined): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return Number.isNaN(value) ? '' : String(value);
  return `s:${value}`;
}

function rowKeys(table: TableLike, names: string[]): string[] {
  const byName = new Map(table.columns.map((c) => [c.name, c.values]));
  const keys: string[] = new Array(table.rowCount);
  for (let r = 0; r < table.rowCount; r++) {
    let key = '';
    for (const name of names) {
      const values = byName.get(name);
      key += `${cell(values ? values[r] : null)}\u0001`;
    }
    keys[r] = key;
  }
  return keys;
}

function sameColumn(a: ArrayLike<number | string | null>, b: ArrayLike<number | string | null>): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (cell(a[i]) !== cell(b[i])) return false;
  return true;
}

function toNumber(value: number | string | null): number | null {
  if (value === null) return null;
  if (typeof value === 'number') return Number.isFinite(value) ? value : null;
  const trimmed = value.trim();
  if (trimmed === '') return null;
  const n = Number(trimmed);
  return Number.isFinite(n) ? n : null;
}

/** n, missing, mean, sd (n − 1), min, max; two passes, enough for showing how a column changed. */
export function columnSummary(type: 'number' | 'text', values: ArrayLike<number | string | null>): ColumnSummary {
  if (type === 'text') {
    let missing = 0;
    for (let i = 0; i < values.length; i++) if (values[i] === null || values[i] === '') missing++;
    return { type, n: values.length - missing, missing, mean: null, sd: null, min: null, max: null };
  }
  let n = 0;
  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const x = toNumber(values[i]);
    if (x === null) continue;
    n++;
    sum += x;
    if (x < min) min = x;
    if (x > max) max = x;
  }
  const mean = n > 0 ? sum / n : null;
  let ss = 0;
  if (mean !== null) {
    for (let i = 0; i < values.length; i++) {
      const x = toNumber(values[i]);
      if (x !== null) ss += (x - mean) * (x - mean);
    }
  }
  return {
    type,
    n,
    missing: values.length - n,
    mean,
    sd: n > 1 ? Math.sqrt(ss / (n - 1)) : null,
    min: n > 0 ? min : null,
    max: n > 0 ? max : null,
  };
}

// ---------------------------------------------------------------------------------------------
// Results
// ---------------------------------------------------------------------------------------------

interface NumberEntry {
  name: string;
  value: number | null;
  display: string;
  unit?: string;
}

/** Headline values (`values.<id>`) and table cells (`tables.<table>.<row>.<cell>`) of a step result. */
function resultNumbers(result: StepResult): Map<string, NumberEntry> {
  const out = new Map<string, NumberEntry>();
  for (const v of result.values) {
    out.set(`values.${v.id}`, { name: v.label, value: v.value, display: v.display, unit: v.unit });
  }
  for (const table of result.tables) {
    for (const row of table.rows) {
      for (const [i, c] of row.cells.entries()) {
        const column = table.columns[i];
        const name = `${table.title}: ${row.label}, ${column?.label ?? c.label}`;
        out.set(`tables.${table.id}.${row.id}.${c.id}`, { name, value: c.value, display: c.display, unit: c.unit ?? column?.unit });
      }
    }
  }
  return out;
}

function stepResultsById(results: unknown): Map<string, StepResult> {
  const steps = (results as Partial<EvaluationResult> | null)?.steps;
  return new Map(Array.isArray(steps) ? steps.map((r) => [r.stepId, r]) : []);
}

function resultChanges(from: ComparableRevision, to: ComparableRevision): { results: ResultChange[]; conclusions: ConclusionChange[] } {
  const ra = stepResultsById(from.results);
  const rb = stepResultsById(to.results);
  const results: ResultChange[] = [];
  const conclusions: ConclusionChange[] = [];
  for (const step of to.document.steps) {
    const a = ra.get(step.id);
    const b = rb.get(step.id);
    if (!a || !b) continue;
    const label = stepLabel(step);
    if (a.status !== b.status) {
      conclusions.push({
        stepId: step.id,
        label,
        id: 'status',
        statement: 'The step evaluates without error',
        from: a.status === 'ok',
        to: b.status === 'ok',
        flipped: true,
      });
    }
    const na = resultNumbers(a);
    const nb = resultNumbers(b);
    for (const path of [...new Set([...na.keys(), ...nb.keys()])]) {
      const x = na.get(path);
      const y = nb.get(path);
      const xv = x?.value ?? null;
      const yv = y?.value ?? null;
      // Equal values, or "not available" on both sides (also when a table row exists on one side only).
      if (xv === yv) continue;
      const change: ResultChange = {
        stepId: step.id,
        label,
        path,
        name: (y ?? x)!.name,
        from: xv,
        to: yv,
        fromDisplay: x?.display ?? null,
        toDisplay: y?.display ?? null,
        relativeChange: relativeChange(xv, yv),
      };
      const unit = y?.unit ?? x?.unit;
      if (unit !== undefined) change.unit = unit;
      results.push(change);
    }
    const ca = new Map(a.conclusions.map((c) => [c.id, c]));
    const cb = new Map(b.conclusions.map((c) => [c.id, c]));
    for (const id of [...new Set([...ca.keys(), ...cb.keys()])]) {
      const x = ca.get(id);
      const y = cb.get(id);
      if (x && y && x.value === y.value) continue;
      conclusions.push({
        stepId: step.id,
        label,
        id,
        statement: (y ?? x)!.statement,
        from: x?.value ?? null,
        to: y?.value ?? null,
        flipped: x !== undefined && y !== undefined,
      });
    }
  }
  return { results, conclusions };
}
