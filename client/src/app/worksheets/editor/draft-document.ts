/**
 * Edits of a worksheet draft as pure functions of the document: new steps with their defaults,
 * duplicate, move, remove, what-if confidence levels. Every function returns a new document and
 * leaves its input untouched. No Angular here (unit-tested under mocha).
 */
import type { Source, Step, StepKind, Worksheet } from '@shared/format/worksheet';
import { DATA_KINDS, GROUPED_KINDS, SOURCE_KINDS } from '../results/step-kinds';

/** JSON with object keys sorted, so that two equal documents give the same text whatever their key order. */
export function stableStringify(value: unknown): string {
  if (value === null || typeof value !== 'object') return JSON.stringify(value) ?? 'null';
  if (Array.isArray(value)) return `[${value.map((v) => (v === undefined ? 'null' : stableStringify(v))).join(',')}]`;
  const entries = Object.entries(value as Record<string, unknown>)
    .filter(([, v]) => v !== undefined)
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${stableStringify(v)}`).join(',')}}`;
}

export function clone<T>(value: T): T {
  return structuredClone(value);
}

const ID_PREFIX: Record<StepKind, string> = {
  data: 'data',
  'derived-column': 'derived',
  'spread-summary': 'spread',
  'sigma-interval': 'sigma',
  'target-test': 'target',
  'two-sample-ratio': 'ratio',
  'group-comparison': 'groups',
  'normality-check': 'normality',
  'sample-size-plan': 'plan',
  capability: 'capability',
  note: 'note',
};

/** A step id not used in the document: "sigma-1", "sigma-2", ... */
export function newStepId(kind: StepKind, document: Pick<Worksheet, 'steps'>): string {
  const used = new Set(document.steps.map((s) => s.id));
  const prefix = ID_PREFIX[kind] ?? 'step';
  for (let n = 1; ; n++) {
    const id = `${prefix}-${n}`;
    if (!used.has(id)) return id;
  }
}

/** A column as later steps see it. */
export interface ColumnInfo {
  name: string;
  type: 'number' | 'text';
  unit?: string;
}

/** What an analysis step can read from a data step: its columns, or summary statistics. */
export interface DataStepInfo {
  id: string;
  label: string;
  columns: ColumnInfo[];
  /** Summary-statistics data steps have groups instead of columns. */
  summaryGroups: string[] | null;
}

/**
 * Columns of the data and derived-column steps before `index`. Typed-in columns come from the
 * document; for uploaded files and derived columns `knownColumns` (what the last evaluation
 * reported) wins, and the document's column names are the fallback.
 */
export function dataStepsBefore(
  document: Pick<Worksheet, 'steps'>,
  index: number,
  knownColumns: (stepId: string) => ColumnInfo[] | null,
  label: (step: Step) => string,
): DataStepInfo[] {
  const out: DataStepInfo[] = [];
  const byId = new Map<string, DataStepInfo>();
  document.steps.slice(0, Math.max(0, index)).forEach((step) => {
    if (!DATA_KINDS.has(step.kind)) return;
    let columns: ColumnInfo[] = knownColumns(step.id) ?? [];
    let summaryGroups: string[] | null = null;
    if (step.kind === 'data') {
      const p = step.params;
      if (p.origin === 'summary') {
        summaryGroups = p.groups.map((g, i) => g.label ?? `group ${i + 1}`);
        columns = [];
      } else if (p.origin === 'inline') {
        // Typed-in columns are known from the draft itself; the last evaluation may be older.
        columns = p.columns.map((c) => (c.type === 'number' && c.unit ? { name: c.name, type: c.type, unit: c.unit } : { name: c.name, type: c.type }));
      } else if (p.origin === 'dataset' && p.columns && p.columns.length > 0) {
        // The step names the file's columns (from the upload, or those with units); types and
        // any other columns from the last evaluation.
        const reported = new Map(columns.map((c) => [c.name, c]));
        const named = new Set(p.columns.map((c) => c.name));
        columns = [
          ...p.columns.map((c): ColumnInfo => {
            const type = reported.get(c.name)?.type ?? 'number';
            return type === 'number' && c.unit ? { name: c.name, type, unit: c.unit } : { name: c.name, type };
          }),
          ...columns.filter((c) => !named.has(c.name)),
        ];
      }
    } else if (step.kind === 'derived-column' && columns.length === 0) {
      const from = byId.get(step.params.step);
      const derived: ColumnInfo = step.params.unit ? { name: step.params.name, type: 'number', unit: step.params.unit } : { name: step.params.name, type: 'number' };
      columns = [...(from?.columns ?? []).filter((c) => c.name !== step.params.name), derived];
    }
    const info: DataStepInfo = { id: step.id, label: label(step), columns, summaryGroups };
    out.push(info);
    byId.set(step.id, info);
  });
  return out;
}

/** The source a new analysis step starts with: the nearest data step before it, its first numeric column. */
export function defaultSource(dataSteps: readonly DataStepInfo[], kind: StepKind): Source {
  const nearest = dataSteps[dataSteps.length - 1];
  if (!nearest) return { summary: { n: 10, s: 1 } };
  if (nearest.summaryGroups) return { step: nearest.id };
  const numeric = nearest.columns.filter((c) => c.type === 'number');
  // The newest numeric column: a derived column is usually the one to analyse.
  const column = numeric[numeric.length - 1] ?? nearest.columns[0];
  const source: Source = column ? { step: nearest.id, column: column.name } : { step: nearest.id };
  if (GROUPED_KINDS.has(kind) && 'step' in source) {
    const group = nearest.columns.find((c) => c.type === 'text');
    if (group && kind !== 'spread-summary') return { ...source, groupBy: group.name };
  }
  return source;
}

/** A new step of `kind` with the defaults of the format filled in. */
export function createStep(kind: StepKind, document: Pick<Worksheet, 'steps'>, dataSteps: readonly DataStepInfo[]): Step {
  const id = newStepId(kind, document);
  const source = () => defaultSource(dataSteps, kind);
  switch (kind) {
    case 'data':
      return {
        id,
        kind,
        params: {
          origin: 'inline',
          columns: [{ name: 'value', type: 'number', values: [] }],
        },
      };
    case 'derived-column': {
      const from = dataSteps[dataSteps.length - 1];
      const first = from?.columns.find((c) => c.type === 'number');
      return {
        id,
        kind,
        params: { step: from?.id ?? 'data-1', name: 'derived', expression: first ? safeIdentifier(first.name) : '' },
      };
    }
    case 'spread-summary':
      return { id, kind, params: { source: source() } };
    case 'sigma-interval':
      return { id, kind, params: { source: source(), levels: [0.95], sides: 'two-sided', methods: ['chi-square', 'bonett'] } };
    case 'target-test':
      return { id, kind, params: { source: source(), sigma0: 1, alternative: 'greater', alpha: 0.05 } };
    case 'two-sample-ratio':
      return { id, kind, params: { source: source(), ratio0: 1, alternative: 'two-sided', alpha: 0.05, level: 0.95 } };
    case 'group-comparison':
      return { id, kind, params: { source: source(), alpha: 0.05 } };
    case 'normality-check':
      return { id, kind, params: { source: source(), alpha: 0.05 } };
    case 'sample-size-plan':
      return { id, kind, params: { plan: { goal: 'interval-ratio', level: 0.95, ratio: 2, scale: 'sigma' } } };
    case 'capability':
      return { id, kind, params: { source: source(), level: 0.95 } };
    case 'note':
      return { id, kind, params: { markdown: '' } };
  }
}

/** A column name as an expression identifier where it is one; otherwise left for the user to fix. */
function safeIdentifier(name: string): string {
  return /^[A-Za-z_][A-Za-z0-9_]*$/.test(name) ? name : '';
}

export function insertStep(document: Worksheet, step: Step, atIndex: number): Worksheet {
  const steps = [...document.steps];
  steps.splice(Math.max(0, Math.min(atIndex, steps.length)), 0, step);
  return { ...document, steps };
}

export function replaceStep(document: Worksheet, step: Step): Worksheet {
  return { ...document, steps: document.steps.map((s) => (s.id === step.id ? step : s)) };
}

export function removeStep(document: Worksheet, stepId: string): Worksheet {
  return { ...document, steps: document.steps.filter((s) => s.id !== stepId) };
}

export function moveStep(document: Worksheet, fromIndex: number, toIndex: number): Worksheet {
  const steps = [...document.steps];
  if (fromIndex < 0 || fromIndex >= steps.length) return document;
  const to = Math.max(0, Math.min(toIndex, steps.length - 1));
  if (to === fromIndex) return document;
  const [moved] = steps.splice(fromIndex, 1);
  steps.splice(to, 0, moved!);
  return { ...document, steps };
}

/** A copy of the step right after it, with a new id and "(copy)" in its title. */
export function duplicateStep(document: Worksheet, stepId: string, kindLabel: string): { document: Worksheet; copy: Step } | null {
  const index = document.steps.findIndex((s) => s.id === stepId);
  if (index < 0) return null;
  const original = document.steps[index]!;
  const copy = clone(original);
  copy.id = newStepId(original.kind, document);
  copy.title = `${original.title?.trim() || kindLabel} (copy)`.slice(0, 200);
  return { document: insertStep(document, copy, index + 1), copy };
}

/** Ids of the steps that read from `stepId` (its source, or a derived column's table). */
export function stepsReadingFrom(document: Pick<Worksheet, 'steps'>, stepId: string): string[] {
  return document.steps
    .filter((s) => {
      if (s.kind === 'derived-column') return s.params.step === stepId;
      if (SOURCE_KINDS.has(s.kind) && 'source' in s.params) {
        const source = s.params.source as Source;
        return 'step' in source && source.step === stepId;
      }
      return false;
    })
    .map((s) => s.id);
}

/** The confidence level a step's result is shown at (the first one of an interval step), or null. */
export function confidenceOf(step: Step): number | null {
  switch (step.kind) {
    case 'sigma-interval':
      return step.params.levels[0] ?? null;
    case 'target-test':
      return 1 - step.params.alpha;
    case 'two-sample-ratio':
      return step.params.level;
    case 'capability':
      return step.params.level;
    default:
      return null;
  }
}

/**
 * The step at another confidence level: an interval at `level`, a test at significance 1 − level.
 * Null for kinds without a confidence level.
 */
export function withConfidence(step: Step, level: number): Step | null {
  switch (step.kind) {
    case 'sigma-interval':
      return { ...step, params: { ...step.params, levels: [level] } };
    case 'target-test':
      return { ...step, params: { ...step.params, alpha: roundLevel(1 - level) } };
    case 'two-sample-ratio':
      return { ...step, params: { ...step.params, level, alpha: roundLevel(1 - level) } };
    case 'capability':
      return { ...step, params: { ...step.params, level } };
    default:
      return null;
  }
}

/** 1 − 0.99 is 0.010000000000000009 in binary floating point; keep the level the user meant. */
function roundLevel(x: number): number {
  return Number(x.toPrecision(12));
}

/** The draft with one step viewed at another level (the what-if document). */
export function documentAtLevel(document: Worksheet, stepId: string, level: number): Worksheet | null {
  const step = document.steps.find((s) => s.id === stepId);
  if (!step) return null;
  const changed = withConfidence(step, level);
  return changed ? replaceStep(document, changed) : null;
}

/**
 * Parses a typed confidence level: "99", "99 %", "99.9", or a fraction "0.99". Returns the
 * fraction, or an error message.
 */
export function parseConfidence(text: string): { level: number } | { error: string } {
  const cleaned = text.trim().replace(/\s*%$/, '').replace(',', '.');
  if (cleaned === '') return { error: 'Enter a confidence level, for example 95.' };
  if (!/^[+-]?(\d+(\.\d*)?|\.\d+)$/.test(cleaned)) return { error: 'Enter the level as a number of percent, for example 95 or 99.9.' };
  const value = Number(cleaned);
  const percent = text.includes('%') || value >= 1 ? value : value * 100;
  if (!(percent > 0 && percent < 100)) return { error: 'A confidence level is above 0 % and below 100 %.' };
  return { level: roundLevel(percent / 100) };
}

/** Group columns of analysis steps that read `dataStepId`, for the data editor's group column. */
export function groupColumnOf(document: Pick<Worksheet, 'steps'>, dataStepId: string): string | null {
  const readers = document.steps.filter(
    (s) => GROUPED_KINDS.has(s.kind) && 'source' in s.params && 'step' in (s.params.source as Source) && (s.params.source as { step: string }).step === dataStepId,
  );
  const groups = new Set(readers.map((s) => (s.params as { source: { groupBy?: string } }).source.groupBy ?? ''));
  if (groups.size !== 1) return null;
  const only = [...groups][0];
  return only ? only : null;
}

/** Sets (or clears) the group column of every grouped analysis step that reads `dataStepId`. */
export function setGroupColumn(document: Worksheet, dataStepId: string, column: string | null): Worksheet {
  return {
    ...document,
    steps: document.steps.map((s) => {
      if (!GROUPED_KINDS.has(s.kind) || !('source' in s.params)) return s;
      const source = s.params.source as Source;
      if (!('step' in source) || source.step !== dataStepId) return s;
      const { groupBy: _old, groups: _groups, ...rest } = source;
      const next: Source = column ? { ...rest, groupBy: column } : rest;
      return { ...s, params: { ...s.params, source: next } } as Step;
    }),
  };
}
