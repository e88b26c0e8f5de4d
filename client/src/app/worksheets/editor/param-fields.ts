/**
 * The settings form of each analysis step kind, as data: which fields, how a field's text is read
 * from and written into the step, and the validation message when the text is not acceptable.
 * The `ParamFields` component renders these as Material fields. Pure (unit-tested under mocha).
 *
 * Levels and significance levels are typed in percent (95, 99.9, 5); the document stores fractions.
 */
import type { Step, StepKind } from '@shared/format/worksheet';

export type FieldKind = 'text' | 'number' | 'integer' | 'percent' | 'percent-list' | 'select' | 'multi-select' | 'toggle';

export interface FieldOption {
  readonly value: string;
  readonly label: string;
}

export interface ParamField {
  /** Dotted path in the step, e.g. "params.sigma0", "params.plan.level". */
  readonly path: string;
  readonly label: string;
  readonly kind: FieldKind;
  readonly hint?: string;
  readonly options?: readonly FieldOption[];
  /** Empty text allowed (the property is then left out of the document). */
  readonly optional?: boolean;
  /** Bounds of numbers; `exclusive` makes them strict. */
  readonly min?: number;
  readonly max?: number;
  readonly exclusive?: boolean;
  /** Show the measurements' unit as the field's suffix. */
  readonly unitSuffix?: boolean;
  /** For a toggle: the value the property gets when switched on. */
  readonly onValue?: unknown;
  /** Shown only when this holds for the current step. */
  readonly when?: (step: Step) => boolean;
  /** Fields on one row on wide screens share a group name. */
  readonly wide?: boolean;
}

const ALTERNATIVES: readonly FieldOption[] = [
  { value: 'two-sided', label: 'Two-sided: differs from the value' },
  { value: 'greater', label: 'One-sided: greater than the value' },
  { value: 'less', label: 'One-sided: less than the value' },
];

const SIDES: readonly FieldOption[] = [
  { value: 'two-sided', label: 'Two-sided interval' },
  { value: 'upper', label: 'Upper bound only' },
  { value: 'lower', label: 'Lower bound only' },
];

const alpha: ParamField = {
  path: 'params.alpha',
  label: 'Significance level (%)',
  kind: 'percent',
  min: 0,
  max: 100,
  exclusive: true,
  hint: 'Risk of a false alarm, e.g. 5',
};

const planGoal = (goal: string) => (step: Step) => step.kind === 'sample-size-plan' && step.params.plan.goal === goal;
const planGoals = (...goals: string[]) => (step: Step) => step.kind === 'sample-size-plan' && goals.includes(step.params.plan.goal);
const hasTolerance = (step: Step) => step.kind === 'capability' && step.params.tolerance !== undefined;

export const TITLE_FIELD: ParamField = { path: 'title', label: 'Heading', kind: 'text', optional: true, hint: 'Shown above the step' };

const FIELDS: Partial<Record<StepKind, readonly ParamField[]>> = {
  'sigma-interval': [
    { path: 'params.levels', label: 'Confidence levels (%)', kind: 'percent-list', hint: 'One or more, e.g. 90, 95, 99' },
    { path: 'params.sides', label: 'Interval', kind: 'select', options: SIDES },
    {
      path: 'params.methods',
      label: 'Methods',
      kind: 'multi-select',
      options: [
        { value: 'chi-square', label: 'Chi-square (assumes normality)' },
        { value: 'bonett', label: 'Bonett (robust, needs raw data)' },
      ],
    },
  ],
  'target-test': [
    { path: 'params.sigma0', label: 'Required standard deviation σ₀', kind: 'number', min: 0, exclusive: true, unitSuffix: true },
    { path: 'params.alternative', label: 'Alternative', kind: 'select', options: ALTERNATIVES },
    alpha,
  ],
  'two-sample-ratio': [
    { path: 'params.ratio0', label: 'Variance ratio under H₀', kind: 'number', min: 0, exclusive: true, hint: 'σ₁² / σ₂², usually 1' },
    { path: 'params.alternative', label: 'Alternative', kind: 'select', options: ALTERNATIVES },
    alpha,
    { path: 'params.level', label: 'Confidence level (%)', kind: 'percent', min: 0, max: 100, exclusive: true },
  ],
  'group-comparison': [alpha],
  'normality-check': [alpha],
  capability: [
    { path: 'params.lsl', label: 'Lower specification limit', kind: 'number', optional: true, unitSuffix: true },
    { path: 'params.usl', label: 'Upper specification limit', kind: 'number', optional: true, unitSuffix: true },
    { path: 'params.level', label: 'Confidence level (%)', kind: 'percent', min: 0, max: 100, exclusive: true, hint: 'Of the Cp and Cpk bounds' },
    {
      path: 'params.tolerance',
      label: 'Add a normal tolerance interval',
      kind: 'toggle',
      onValue: { coverage: 0.99, confidence: 0.95, sides: 'two-sided' },
    },
    { path: 'params.tolerance.coverage', label: 'Coverage (%)', kind: 'percent', min: 0, max: 100, exclusive: true, when: hasTolerance },
    { path: 'params.tolerance.confidence', label: 'Confidence (%)', kind: 'percent', min: 0, max: 100, exclusive: true, when: hasTolerance },
    { path: 'params.tolerance.sides', label: 'Tolerance interval', kind: 'select', options: SIDES, when: hasTolerance },
  ],
  'sample-size-plan': [
    {
      path: 'params.plan.goal',
      label: 'Plan for',
      kind: 'select',
      options: [
        { value: 'interval-ratio', label: 'A sigma interval no wider than a ratio' },
        { value: 'relative-precision', label: 'Knowing sigma within ± percent' },
        { value: 'chi-square-power', label: 'Power of a target test' },
        { value: 'f-power', label: 'Power of a two-sample ratio test' },
      ],
      wide: true,
    },
    { path: 'params.plan.level', label: 'Confidence level (%)', kind: 'percent', min: 0, max: 100, exclusive: true, when: planGoals('interval-ratio', 'relative-precision') },
    { path: 'params.plan.ratio', label: 'Largest ratio upper / lower', kind: 'number', min: 1, exclusive: true, when: planGoal('interval-ratio') },
    {
      path: 'params.plan.scale',
      label: 'Ratio of',
      kind: 'select',
      options: [
        { value: 'sigma', label: 'Standard deviations' },
        { value: 'variance', label: 'Variances' },
      ],
      when: planGoal('interval-ratio'),
    },
    { path: 'params.plan.percent', label: 'Within ± (%)', kind: 'number', min: 0, max: 100, exclusive: true, when: planGoal('relative-precision') },
    {
      path: 'params.plan.criterion',
      label: 'Criterion',
      kind: 'select',
      options: [
        { value: 'exact', label: 'Exact (chi-square)' },
        { value: 'greenwood-sandomire', label: 'Greenwood-Sandomire approximation' },
      ],
      when: planGoal('relative-precision'),
    },
    { path: 'params.plan.ratio', label: 'True σ / σ₀ to detect', kind: 'number', min: 0, exclusive: true, when: planGoal('chi-square-power') },
    { path: 'params.plan.ratio', label: 'True σ₁ / σ₂ to detect', kind: 'number', min: 0, exclusive: true, when: planGoal('f-power') },
    { path: 'params.plan.alternative', label: 'Alternative', kind: 'select', options: ALTERNATIVES, when: planGoals('chi-square-power', 'f-power') },
    { ...alpha, path: 'params.plan.alpha', when: planGoals('chi-square-power', 'f-power') },
    { path: 'params.plan.n', label: 'Sample size n', kind: 'integer', min: 2, optional: true, when: planGoals('chi-square-power', 'f-power'), hint: 'Give n for its power…' },
    { path: 'params.plan.power', label: 'Required power (%)', kind: 'percent', min: 0, max: 100, exclusive: true, optional: true, when: planGoals('chi-square-power', 'f-power'), hint: '…or the power for its n' },
  ],
};

/** The fields of a kind's settings form that apply to `step` now. */
export function fieldsFor(step: Step): ParamField[] {
  return (FIELDS[step.kind] ?? []).filter((f) => !f.when || f.when(step));
}

/** All fields a kind can show (stable list for building form controls). */
export function allFieldsOf(kind: StepKind): readonly ParamField[] {
  return FIELDS[kind] ?? [];
}

/** A stable key of a field within its kind (two fields may share a path under different conditions). */
export function fieldKey(field: ParamField, kind: StepKind): string {
  const index = allFieldsOf(kind).indexOf(field);
  return `${field.path}#${index}`;
}

// ---------------------------------------------------------------------------------------------
// Paths
// ---------------------------------------------------------------------------------------------

export function getPath(value: unknown, path: string): unknown {
  let current = value;
  for (const key of path.split('.')) {
    if (current === null || typeof current !== 'object') return undefined;
    current = (current as Record<string, unknown>)[key];
  }
  return current;
}

/** A copy of `value` with `path` set (or removed when `next` is undefined); objects on the way are copied. */
export function setPath<T>(value: T, path: string, next: unknown): T {
  const [key, ...rest] = path.split('.');
  const base = (value ?? {}) as Record<string, unknown>;
  const copy: Record<string, unknown> = Array.isArray(base) ? ([...base] as unknown as Record<string, unknown>) : { ...base };
  if (rest.length === 0) {
    if (next === undefined) delete copy[key!];
    else copy[key!] = next;
  } else {
    copy[key!] = setPath(base[key!], rest.join('.'), next);
  }
  return copy as T;
}

// ---------------------------------------------------------------------------------------------
// Text ↔ value
// ---------------------------------------------------------------------------------------------

function formatNumber(x: number): string {
  return String(Number(x.toPrecision(12)));
}

/** The text a field shows for the step's current value. */
export function fieldText(step: Step, field: ParamField): string | string[] | boolean {
  const value = getPath(step, field.path);
  switch (field.kind) {
    case 'toggle':
      return value !== undefined;
    case 'multi-select':
      return Array.isArray(value) ? value.map(String) : [];
    case 'percent':
      return typeof value === 'number' ? formatNumber(value * 100) : '';
    case 'percent-list':
      return Array.isArray(value) ? value.map((v) => formatNumber(Number(v) * 100)).join(', ') : '';
    case 'number':
    case 'integer':
      return typeof value === 'number' ? formatNumber(value) : '';
    default:
      return typeof value === 'string' ? value : value === undefined || value === null ? '' : String(value);
  }
}

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

function parseNumber(text: string): number | null {
  const cleaned = text.trim().replace(/\s/g, '').replace(/,(?=\d+$)/, '.');
  if (!NUMBER.test(cleaned)) return null;
  const n = Number(cleaned);
  return Number.isFinite(n) ? n : null;
}

function boundsMessage(field: ParamField, what: string): string {
  const { min, max, exclusive } = field;
  if (min !== undefined && max !== undefined) {
    return exclusive ? `${what} must be above ${min} and below ${max}.` : `${what} must be from ${min} to ${max}.`;
  }
  if (min !== undefined) return exclusive ? `${what} must be greater than ${min}.` : `${what} must be at least ${min}.`;
  if (max !== undefined) return exclusive ? `${what} must be less than ${max}.` : `${what} must be at most ${max}.`;
  return `${what} is out of range.`;
}

function inBounds(field: ParamField, x: number): boolean {
  if (field.min !== undefined && (field.exclusive ? x <= field.min : x < field.min)) return false;
  if (field.max !== undefined && (field.exclusive ? x >= field.max : x > field.max)) return false;
  return true;
}

export type ParsedField = { ok: true; value: unknown } | { ok: false; message: string };

/** Reads a field's text into the value stored in the document, or the validation message. */
export function parseField(field: ParamField, text: string | string[] | boolean): ParsedField {
  const label = field.label.replace(/\s*\(%\)$/, '');
  switch (field.kind) {
    case 'toggle':
      return { ok: true, value: text === true ? field.onValue : undefined };
    case 'multi-select': {
      const values = Array.isArray(text) ? text : [];
      if (values.length === 0) return { ok: false, message: `Choose at least one of the ${label.toLowerCase()}.` };
      return { ok: true, value: values };
    }
    case 'select':
      if (typeof text !== 'string' || text === '') return { ok: false, message: `Choose the ${label.toLowerCase()}.` };
      return { ok: true, value: text };
    case 'text': {
      const value = typeof text === 'string' ? text.trim() : '';
      if (value === '') return field.optional ? { ok: true, value: undefined } : { ok: false, message: `${label} is required.` };
      if (value.length > 200) return { ok: false, message: `${label} can have at most 200 characters.` };
      return { ok: true, value };
    }
    case 'number':
    case 'integer':
    case 'percent': {
      const raw = typeof text === 'string' ? text.trim() : '';
      if (raw === '') return field.optional ? { ok: true, value: undefined } : { ok: false, message: `${label} is required.` };
      const n = parseNumber(raw.replace(/\s*%$/, ''));
      if (n === null) return { ok: false, message: `Enter a number${field.kind === 'percent' ? ' of percent, e.g. 95' : ''}.` };
      if (field.kind === 'integer' && !Number.isInteger(n)) return { ok: false, message: `${label} must be a whole number.` };
      if (!inBounds(field, n)) return { ok: false, message: boundsMessage(field, label) };
      return { ok: true, value: field.kind === 'percent' ? Number((n / 100).toPrecision(12)) : n };
    }
    case 'percent-list': {
      const raw = typeof text === 'string' ? text : '';
      // In a list the comma separates levels (write 99.9, not 99,9).
      const parts = raw
        .split(/[,;\s]+/)
        .map((p) => p.trim())
        .filter((p) => p !== '');
      if (parts.length === 0) return { ok: false, message: `Enter at least one level, e.g. 95.` };
      if (parts.length > 12) return { ok: false, message: `Enter at most 12 levels.` };
      const levels: number[] = [];
      for (const part of parts) {
        const n = parseNumber(part.replace(/%$/, ''));
        if (n === null) return { ok: false, message: `“${part}” is not a number of percent.` };
        if (!(n > 0 && n < 100)) return { ok: false, message: `A confidence level must be above 0 and below 100 % (got ${part}).` };
        levels.push(Number((n / 100).toPrecision(12)));
      }
      return { ok: true, value: levels };
    }
  }
}

/** A copy of the step with the field set from its text, or the validation message. */
export function applyField(step: Step, field: ParamField, text: string | string[] | boolean): { step: Step } | { message: string } {
  const parsed = parseField(field, text);
  if (!parsed.ok) return { message: parsed.message };
  return { step: setPath(step, field.path, parsed.value) };
}
