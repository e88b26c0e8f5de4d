/**
 * A step's parameters in plain words, for read-only views (revision, published view) and the
 * editor's collapsed cards. Pure (no Angular).
 */
import type { Source, Step, Worksheet } from '@shared/format/worksheet';

export interface ParamLine {
  readonly label: string;
  readonly value: string;
}

export function percentText(fraction: number): string {
  return `${Number((fraction * 100).toPrecision(10))} %`;
}

const ALTERNATIVE: Record<string, string> = {
  'two-sided': 'two-sided (σ ≠ σ₀)',
  greater: 'one-sided, σ greater than σ₀',
  less: 'one-sided, σ less than σ₀',
};

const SIDES: Record<string, string> = {
  'two-sided': 'two-sided interval',
  lower: 'lower bound only',
  upper: 'upper bound only',
};

export function stepLabel(step: Pick<Step, 'id' | 'title' | 'kind'>, kindLabel: string): string {
  return step.title?.trim() || kindLabel;
}

/** Titles of all steps by id (for "from step …" references). */
export function stepTitles(document: Pick<Worksheet, 'steps'>, kindLabel: (kind: string) => string): Record<string, string> {
  const titles: Record<string, string> = {};
  document.steps.forEach((step, index) => {
    titles[step.id] = `${index + 1}. ${stepLabel(step, kindLabel(step.kind))}`;
  });
  return titles;
}

export function sourceText(source: Source, titles: Readonly<Record<string, string>>): string {
  if ('summary' in source) {
    const groups = Array.isArray(source.summary) ? source.summary : [source.summary];
    return groups
      .map((g) => `${g.label ? `${g.label}: ` : ''}n = ${g.n}, s = ${g.s}${g.mean !== undefined ? `, mean = ${g.mean}` : ''}${source.unit ? ` ${source.unit}` : ''}`)
      .join('; ');
  }
  const from = titles[source.step] ?? source.step;
  const column = source.column ? `column “${source.column}” of ${from}` : from;
  const grouped = source.groupBy ? `, grouped by “${source.groupBy}”` : '';
  const groups = source.groups && source.groups.length > 0 ? ` (${source.groups.join(', ')})` : '';
  return `${column}${grouped}${groups}`;
}

export function describeStep(step: Step, titles: Readonly<Record<string, string>> = {}): ParamLine[] {
  const lines: ParamLine[] = [];
  const add = (label: string, value: string | number | undefined | null) => {
    if (value !== undefined && value !== null && value !== '') lines.push({ label, value: String(value) });
  };
  switch (step.kind) {
    case 'data': {
      const p = step.params;
      if (p.origin === 'inline') {
        add('Table', `${p.columns.length} columns, ${Math.max(0, ...p.columns.map((c) => c.values.length))} rows, typed in`);
        add('Columns', p.columns.map((c) => (c.type === 'number' && c.unit ? `${c.name} (${c.unit})` : c.name)).join(', '));
      } else if (p.origin === 'dataset') {
        add('File', p.fileName ?? 'uploaded file');
        add('Dataset', p.datasetId.slice(0, 12));
        if (p.columns?.length) add('Units', p.columns.filter((c) => c.unit).map((c) => `${c.name}: ${c.unit}`).join(', '));
      } else {
        add('Summary statistics', p.groups.map((g) => `${g.label ? `${g.label}: ` : ''}n = ${g.n}, s = ${g.s}${g.mean !== undefined ? `, mean = ${g.mean}` : ''}`).join('; '));
        add('Unit', p.unit);
      }
      break;
    }
    case 'derived-column':
      add('From', titles[step.params.step] ?? step.params.step);
      add('New column', step.params.unit ? `${step.params.name} (${step.params.unit})` : step.params.name);
      add('Expression', step.params.expression);
      break;
    case 'spread-summary':
      add('Measurements', sourceText(step.params.source, titles));
      break;
    case 'sigma-interval':
      add('Measurements', sourceText(step.params.source, titles));
      add('Confidence levels', step.params.levels.map(percentText).join(', '));
      add('Interval', SIDES[step.params.sides] ?? step.params.sides);
      add('Methods', step.params.methods.map((m) => (m === 'bonett' ? 'Bonett (robust)' : 'chi-square')).join(', '));
      break;
    case 'target-test':
      add('Measurements', sourceText(step.params.source, titles));
      add('Required σ₀', step.params.sigma0);
      add('Alternative', ALTERNATIVE[step.params.alternative] ?? step.params.alternative);
      add('Significance level', percentText(step.params.alpha));
      break;
    case 'two-sample-ratio':
      add('Samples', sourceText(step.params.source, titles));
      add('Ratio σ₁²/σ₂² under H₀', step.params.ratio0);
      add('Alternative', step.params.alternative);
      add('Significance level', percentText(step.params.alpha));
      add('Confidence level', percentText(step.params.level));
      break;
    case 'group-comparison':
      add('Groups', sourceText(step.params.source, titles));
      add('Significance level', percentText(step.params.alpha));
      break;
    case 'normality-check':
      add('Measurements', sourceText(step.params.source, titles));
      add('Significance level', percentText(step.params.alpha));
      break;
    case 'sample-size-plan': {
      const plan = step.params.plan;
      if (plan.goal === 'interval-ratio') {
        add('Goal', `interval ratio upper/lower at most ${plan.ratio} (${plan.scale})`);
        add('Confidence level', percentText(plan.level));
      } else if (plan.goal === 'relative-precision') {
        add('Goal', `σ within ±${plan.percent} % (${plan.criterion})`);
        add('Confidence level', percentText(plan.level));
      } else {
        add('Goal', plan.goal === 'chi-square-power' ? 'power of the chi-square test' : 'power of the F test');
        add('Ratio to detect', plan.ratio);
        add('Alternative', plan.alternative);
        add('Significance level', percentText(plan.alpha));
        add('Sample size', plan.n);
        add('Required power', plan.power !== undefined ? percentText(plan.power) : undefined);
      }
      break;
    }
    case 'capability':
      add('Measurements', sourceText(step.params.source, titles));
      add('Lower limit', step.params.lsl);
      add('Upper limit', step.params.usl);
      add('Confidence level', percentText(step.params.level));
      if (step.params.tolerance) {
        const t = step.params.tolerance;
        add('Tolerance interval', `${percentText(t.coverage)} coverage at ${percentText(t.confidence)} confidence, ${t.sides}`);
      }
      break;
    case 'note':
      break;
  }
  return lines;
}
