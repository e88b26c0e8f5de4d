/**
 * The step kinds as the client names and shows them (our own names, DESIGN.md), and which of them
 * have a confidence level that can be viewed at another level, or rely on normality. Pure (no Angular).
 */
import type { StepKind } from '@shared/format/worksheet';

export interface StepKindInfo {
  readonly kind: StepKind;
  readonly label: string;
  /** Material Symbols ligature. */
  readonly icon: string;
  /** One line for the add-step menu. */
  readonly description: string;
  /** The menu group the kind is listed under. */
  readonly group: 'data' | 'spread' | 'compare' | 'plan' | 'text';
}

/** In the order of the add-step menu. */
export const STEP_KIND_INFO: readonly StepKindInfo[] = [
  { kind: 'data', label: 'Data', icon: 'table_chart', description: 'Measurements pasted, uploaded or typed; or summary statistics', group: 'data' },
  { kind: 'derived-column', label: 'Derived column', icon: 'function', description: 'A new column computed from others (unit conversion, differences)', group: 'data' },
  { kind: 'spread-summary', label: 'Spread summary', icon: 'query_stats', description: 'n, mean, variance, standard deviation, CV, range; per group', group: 'spread' },
  { kind: 'sigma-interval', label: 'Sigma interval', icon: 'straighten', description: 'Confidence interval for the standard deviation (chi-square, Bonett)', group: 'spread' },
  { kind: 'target-test', label: 'Target test', icon: 'target', description: 'Test a standard deviation against a required value', group: 'spread' },
  { kind: 'normality-check', label: 'Normality check', icon: 'area_chart', description: 'Shapiro-Wilk, Anderson-Darling, skewness, kurtosis, probability plot', group: 'spread' },
  { kind: 'two-sample-ratio', label: 'Two-sample ratio', icon: 'compare_arrows', description: 'F test and interval for the ratio of two variances', group: 'compare' },
  { kind: 'group-comparison', label: 'Group comparison', icon: 'stacked_bar_chart', description: 'Bartlett, Levene, Brown-Forsythe, one-way ANOVA', group: 'compare' },
  { kind: 'capability', label: 'Capability', icon: 'speed', description: 'Cp and Cpk with confidence bounds; tolerance intervals', group: 'plan' },
  { kind: 'sample-size-plan', label: 'Sample-size plan', icon: 'calculate', description: 'How many measurements are needed; power of a variance test', group: 'plan' },
  { kind: 'note', label: 'Note', icon: 'notes', description: 'Text with formulas (Markdown and TeX)', group: 'text' },
];

export const STEP_KIND_GROUPS: readonly { id: StepKindInfo['group']; label: string }[] = [
  { id: 'data', label: 'Data' },
  { id: 'spread', label: 'Spread of one sample' },
  { id: 'compare', label: 'Comparing samples' },
  { id: 'plan', label: 'Capability and planning' },
  { id: 'text', label: 'Text' },
];

const BY_KIND = new Map(STEP_KIND_INFO.map((info) => [info.kind, info]));

export function stepKindInfo(kind: string): StepKindInfo {
  return (
    BY_KIND.get(kind as StepKind) ?? { kind: kind as StepKind, label: kind, icon: 'help', description: '', group: 'text' }
  );
}

/** Kinds whose results can be viewed at another confidence level without editing (what-if). */
export const CONFIDENCE_KINDS: ReadonlySet<StepKind> = new Set<StepKind>([
  'sigma-interval',
  'target-test',
  'two-sample-ratio',
  'capability',
]);

/** Kinds that read measurements from an earlier step (a `source`). */
export const SOURCE_KINDS: ReadonlySet<StepKind> = new Set<StepKind>([
  'spread-summary',
  'sigma-interval',
  'target-test',
  'two-sample-ratio',
  'group-comparison',
  'normality-check',
  'capability',
]);

/** Kinds that hold a table other steps can read. */
export const DATA_KINDS: ReadonlySet<StepKind> = new Set<StepKind>(['data', 'derived-column']);

/** Kinds that split their measurements by a group column. */
export const GROUPED_KINDS: ReadonlySet<StepKind> = new Set<StepKind>(['spread-summary', 'two-sample-ratio', 'group-comparison']);
