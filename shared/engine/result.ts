/**
 * What the engine returns for a worksheet: one StepResult per step, in document order.
 *
 * Every StepResult has the same shape whatever its kind and status, so the client, the revision
 * comparison and the published view read it without special cases:
 *
 * - `values`: the headline quantities, in display order. Each carries the full-precision number
 *   (`value`), the text to show (`display`, with `digits` significant digits) and its unit. A
 *   quantity that cannot be computed has `value: null`, `display: "not available"` and a `reason`:
 *   a NaN or an infinity is never shown as a number.
 * - `tables`: structured results (intervals at several levels, per-group summaries, ANOVA table),
 *   rows and cells keyed by stable ids.
 * - `conclusions`: a few named yes/no statements (`rejectH0`, `normalityRejected`, ...) that a
 *   revision comparison can match by id to report conclusions that flipped.
 * - `formulas`: LaTeX, symbolic and with the numbers substituted.
 * - `reading`: a hedged plain-language sentence or two.
 * - `assumptions`: each with its check status; `warnings`: things the reader must know.
 * - `plot`: a Vega-Lite spec with inline data only (no expressions to evaluate), or null.
 * - `sources`: the published source(s) of the method.
 * - `caution`: the standing caution that the result supports, and does not replace, judgement.
 * - `error`: null when `status` is "ok"; the typed error (naming the step and the field) otherwise.
 *
 * All numbers in a result are finite, so `canonicalJson` of an EvaluationResult never throws and
 * is byte-identical across processes for the same input.
 */
import type { StepKind } from '../format/worksheet';

export const RESULTS_FORMAT = 'spreadproof.results';

export type ResultStatus = 'ok' | 'error';

export interface ResultValue {
  /** Stable id within the step (e.g. "sd", "chisq.0.95.upper"). */
  id: string;
  label: string;
  /** LaTeX symbol, e.g. "s" or "\\chi^2". */
  symbol?: string;
  /** Full-precision value; null when not available (see `reason`). */
  value: number | null;
  /** The value with `digits` significant digits (integers in full), or "not available". */
  display: string;
  /** Significant digits of `display`; 0 for exact counts. */
  digits: number;
  unit?: string;
  reason?: string;
}

export interface ResultTableColumn {
  id: string;
  label: string;
  unit?: string;
}

export interface ResultTableRow {
  id: string;
  label: string;
  /** One cell per column, `cells[i].id === columns[i].id`. */
  cells: ResultValue[];
}

export interface ResultTable {
  id: string;
  title: string;
  columns: ResultTableColumn[];
  rows: ResultTableRow[];
}

export interface Conclusion {
  /** Stable id, e.g. "rejectH0", "upperBoundMeetsTarget". */
  id: string;
  value: boolean;
  /** The statement that `value` says is true or false, in plain words. */
  statement: string;
}

export interface Formula {
  id: string;
  label: string;
  /** LaTeX, symbolic. */
  symbolic: string;
  /** LaTeX with the numbers of this result substituted. */
  substituted: string;
}

export type AssumptionStatus =
  | 'not-checked' // nothing in the worksheet checks it
  | 'not-rejected' // a check ran and found no evidence against it
  | 'rejected' // a check found evidence against it
  | 'by-design'; // cannot be checked from the data (e.g. independence); the user must vouch for it

export interface Assumption {
  id: 'independence' | 'normality' | 'equal-variances' | 'stable-process' | string;
  statement: string;
  status: AssumptionStatus;
  /** The step that checked it (a normality-check id), if any. */
  checkedBy?: string;
  detail?: string;
}

export interface Warning {
  code: string;
  message: string;
  /** The step the warning comes from, when not this one (e.g. a normality check). */
  fromStep?: string;
}

export interface Citation {
  id: string;
  text: string;
}

export type ErrorCode =
  | 'missing-step' // a reference to a step that does not exist (or comes later)
  | 'missing-column' // a reference to a column the step does not have
  | 'wrong-step-kind' // a reference to a step that holds no data
  | 'upstream-error' // the referenced step itself failed
  | 'invalid-parameter' // a parameter out of its range (confidence outside (0, 1), sigma0 <= 0, ...)
  | 'insufficient-data' // n < 2, a group with fewer than 2 values, ...
  | 'zero-variance'
  | 'non-finite' // a value that is NaN or infinite
  | 'missing-dataset'
  | 'invalid-dataset'
  | 'expression' // derived-column expression error
  | 'internal'; // a defect of the engine; the message says so

export interface StepError {
  code: ErrorCode;
  stepId: string;
  /** Path of the offending field in the step, e.g. "params.levels.0", "params.source.column". */
  field: string;
  /** Human-readable message that names the step and the field. */
  message: string;
}

/** A column as a data or derived-column step leaves it for later steps. */
export interface DataColumnSummary {
  name: string;
  type: 'number' | 'text';
  unit?: string;
  /** Numeric cells usable as measurements. */
  count: number;
  /** Blank cells. */
  missing: number;
  /** Non-blank cells that are not numbers (numeric columns), reported, never read as zero. */
  skipped: number;
}

export interface DataSummary {
  rowCount: number;
  columns: DataColumnSummary[];
  /** Present for summary-statistics data steps. */
  groups?: { label: string; n: number; mean: number | null; s: number }[];
}

export interface StepResult {
  stepId: string;
  kind: StepKind;
  title: string;
  status: ResultStatus;
  error: StepError | null;
  values: ResultValue[];
  tables: ResultTable[];
  conclusions: Conclusion[];
  formulas: Formula[];
  reading: string;
  assumptions: Assumption[];
  warnings: Warning[];
  plot: Record<string, unknown> | null;
  sources: Citation[];
  caution: string | null;
  /** Data and derived-column steps: the columns they provide. */
  data: DataSummary | null;
  /** Note steps: sanitized HTML. */
  html: string | null;
}

export interface EvaluationResult {
  format: typeof RESULTS_FORMAT;
  engineVersion: string;
  /** SHA-256 of the canonical JSON of the validated worksheet (defaults filled in). */
  worksheetHash: string;
  steps: StepResult[];
  counts: { ok: number; error: number };
}

export const STANDARD_CAUTION =
  'This result supports, and does not replace, qualified judgement, your quality system, customer requirements and the applicable standards (e.g. ISO 16269, ISO 22514).';

// ---------------------------------------------------------------------------------------------
// Building values
// ---------------------------------------------------------------------------------------------

export const NOT_AVAILABLE = 'not available';

/**
 * Formats a finite number with `digits` significant digits: fixed notation for magnitudes from
 * 1e-5 to 1e15, otherwise "1.234e-7". Trailing zeros are kept (they are significant).
 */
export function formatSignificant(x: number, digits: number): string {
  if (!Number.isFinite(x)) throw new RangeError(`formatSignificant: non-finite ${x}`);
  if (x === 0) return digits > 1 ? '0.' + '0'.repeat(digits - 1) : '0';
  const p = x.toPrecision(digits);
  const e = p.indexOf('e');
  if (e < 0) return p;
  const exponent = Number(p.slice(e + 1));
  if (exponent >= -5 && exponent < 15) {
    return x.toFixed(Math.max(0, Math.min(100, digits - 1 - exponent)));
  }
  return p.slice(0, e) + 'e' + exponent;
}

export interface ValueOptions {
  symbol?: string;
  unit?: string;
  digits?: number;
}

/** A measured or computed quantity; a non-finite `value` becomes "not available" with `reasonIfMissing`. */
export function numberValue(
  id: string,
  label: string,
  value: number | null | undefined,
  options: ValueOptions & { reasonIfMissing?: string } = {},
): ResultValue {
  const digits = options.digits ?? 4;
  const base: ResultValue = { id, label, value: null, display: NOT_AVAILABLE, digits };
  if (options.symbol !== undefined) base.symbol = options.symbol;
  if (options.unit !== undefined && options.unit !== '') base.unit = options.unit;
  if (value === null || value === undefined || !Number.isFinite(value)) {
    base.reason = options.reasonIfMissing ?? (value === Infinity || value === -Infinity ? 'unbounded' : 'could not be computed');
    if (value === Infinity) base.display = 'unbounded';
    if (value === -Infinity) base.display = 'unbounded';
    return base;
  }
  base.value = value;
  base.display = formatSignificant(value, digits);
  return base;
}

/** An exact count (n, degrees of freedom): shown in full. */
export function countValue(id: string, label: string, value: number, options: { symbol?: string } = {}): ResultValue {
  const v: ResultValue = { id, label, value, display: String(value), digits: 0 };
  if (options.symbol !== undefined) v.symbol = options.symbol;
  return v;
}

/** A value that does not apply here, with the reason. */
export function unavailableValue(id: string, label: string, reason: string, options: ValueOptions = {}): ResultValue {
  return numberValue(id, label, null, { ...options, reasonIfMissing: reason });
}

/**
 * Significant digits for a location value (mean, median, a limit) shown beside a spread: enough
 * that its last digit sits where the last of the spread's `digits` significant digits sits
 * (25.0012 with sd 0.002715 → "25.001200", not "25.00"), capped at 15.
 */
export function locationDigits(value: number, spread: number, digits: number): number {
  if (!Number.isFinite(value) || !Number.isFinite(spread) || spread <= 0 || value === 0) return digits;
  const lastPlace = Math.floor(Math.log10(spread)) - (digits - 1);
  const firstPlace = Math.floor(Math.log10(Math.abs(value)));
  return Math.min(15, Math.max(digits, firstPlace - lastPlace + 1));
}

/** A p-value: 4 significant digits, "< 1e-300" style display below the double range. */
export function pValue(id: string, label: string, p: number, digits = 4): ResultValue {
  const v = numberValue(id, label, p, { symbol: 'p', digits });
  if (v.value !== null && v.value === 0) v.display = '< 1e-300';
  return v;
}

/** The unit of a variance given the unit of the data ("um" → "um²", "mm/s" → "(mm/s)²"). */
export function squaredUnit(unit: string | undefined): string | undefined {
  if (unit === undefined || unit === '') return undefined;
  return /^[A-Za-zµμ%°]+$/.test(unit) ? `${unit}²` : `(${unit})²`;
}

/** LaTeX for a number in substituted formulas (no exponent letters: 1.2 \times 10^{-5}). */
export function texNumber(x: number, digits = 6): string {
  if (!Number.isFinite(x)) return x > 0 ? '\\infty' : x < 0 ? '-\\infty' : '\\text{n/a}';
  const s = formatSignificant(x, digits);
  const e = s.indexOf('e');
  if (e < 0) return s;
  return `${s.slice(0, e)} \\times 10^{${s.slice(e + 1)}}`;
}

/** An empty ok result for `step`, to be filled by its runner. */
export function emptyResult(stepId: string, kind: StepKind, title: string): StepResult {
  return {
    stepId,
    kind,
    title,
    status: 'ok',
    error: null,
    values: [],
    tables: [],
    conclusions: [],
    formulas: [],
    reading: '',
    assumptions: [],
    warnings: [],
    plot: null,
    sources: [],
    caution: null,
    data: null,
    html: null,
  };
}

export function errorResult(stepId: string, kind: StepKind, title: string, error: StepError): StepResult {
  return { ...emptyResult(stepId, kind, title), status: 'error', error };
}
