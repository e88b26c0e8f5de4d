/** Display names of the step kinds (DESIGN.md's own names). Pure. */
export const STEP_KIND_LABEL: Readonly<Record<string, string>> = {
  data: 'Data',
  'derived-column': 'Derived column',
  'spread-summary': 'Spread summary',
  'sigma-interval': 'Sigma interval',
  'target-test': 'Target test',
  'two-sample-ratio': 'Two-sample ratio',
  'group-comparison': 'Group comparison',
  'normality-check': 'Normality check',
  'sample-size-plan': 'Sample-size plan',
  capability: 'Capability',
  note: 'Note',
};

export function stepKindLabel(kind: string): string {
  return STEP_KIND_LABEL[kind] ?? kind;
}
