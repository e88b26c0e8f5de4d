/**
 * A read-only summary of a step's parameters ("Levels: 95 %, 99 %", "Required sigma: 0.5"), for the
 * revision page and the published view, where the editor's forms are not shown. Pure.
 */
import type { Source, Step } from '@shared/format/worksheet';
import { percentText } from './revision-labels';

export interface ParameterLine {
  label: string;
  value: string;
}

const SIDES: Readonly<Record<string, string>> = {
  'two-sided': 'two-sided',
  lower: 'lower bound only',
  upper: 'upper bound only',
};

const ALTERNATIVE: Readonly<Record<string, string>> = {
  'two-sided': 'sigma differs from the required value',
  greater: 'sigma is greater than the required value',
  less: 'sigma is less than the required value',
};

function sourceText(source: Source): string {
  if ('summary' in source) {
    const groups = Array.isArray(source.summary) ? source.summary : [source.summary];
    return groups.map((g) => `${g.label ? g.label + ': ' : ''}n = ${g.n}, s = ${g.s}${source.unit ? ' ' + source.unit : ''}`).join('; ');
  }
  let text = `step ${source.step}`;
  if (source.column) text += `, column ${source.column}`;
  if (source.groupBy) text += `, grouped by ${source.groupBy}`;
  if (source.groups && source.groups.length > 0) text += ` (${source.groups.join(', ')})`;
  return text;
}

export function parameterLines(step: Step): ParameterLine[] {
  switch (step.kind) {
    case 'data': {
      const p = step.params;
      if (p.origin === 'inline') {
        const rows = Math.max(0, ...p.columns.map((c) => c.values.length));
        return [
          { label: 'Data', value: `typed or pasted, ${rows} rows` },
          { label: 'Columns', value: p.columns.map((c) => (c.type === 'number' && c.unit ? `${c.name} (${c.unit})` : c.name)).join(', ') },
        ];
      }
      if (p.origin === 'dataset') {
        return [
          { label: 'Data', value: `uploaded file${p.fileName ? ' ' + p.fileName : ''}` },
          { label: 'Dataset', value: p.datasetId.slice(0, 12) },
        ];
      }
      return [
        { label: 'Data', value: 'summary statistics' },
        {
          label: 'Groups',
          value: p.groups.map((g) => `${g.label ? g.label + ': ' : ''}n = ${g.n}, s = ${g.s}${g.mean !== undefined ? `, mean = ${g.mean}` : ''}`).join('; '),
        },
      ];
    }
    case 'derived-column':
      return [
        { label: 'From', value: `step ${step.params.step}` },
        { label: 'New column', value: `${step.params.name}${step.params.unit ? ' (' + step.params.unit + ')' : ''} = ${step.params.expression}` },
      ];
    case 'spread-summary':
      return [{ label: 'Data', value: sourceText(step.params.source) }];
    case 'sigma-interval':
      return [
        { label: 'Data', value: sourceText(step.params.source) },
        { label: 'Confidence', value: step.params.levels.map(percentText).join(', ') },
        { label: 'Interval', value: SIDES[step.params.sides] ?? step.params.sides },
        { label: 'Methods', value: step.params.methods.map((m) => (m === 'chi-square' ? 'chi-square' : 'Bonett')).join(', ') },
      ];
    case 'target-test':
      return [
        { label: 'Data', value: sourceText(step.params.source) },
        { label: 'Required sigma', value: String(step.params.sigma0) },
        { label: 'Alternative', value: ALTERNATIVE[step.params.alternative] ?? step.params.alternative },
        { label: 'Significance', value: `alpha = ${step.params.alpha}` },
      ];
    case 'two-sample-ratio':
      return [
        { label: 'Data', value: sourceText(step.params.source) },
        { label: 'Hypothesised ratio', value: String(step.params.ratio0) },
        { label: 'Significance', value: `alpha = ${step.params.alpha}` },
        { label: 'Confidence', value: percentText(step.params.level) },
      ];
    case 'group-comparison':
      return [
        { label: 'Data', value: sourceText(step.params.source) },
        { label: 'Significance', value: `alpha = ${step.params.alpha}` },
      ];
    case 'normality-check':
      return [
        { label: 'Data', value: sourceText(step.params.source) },
        { label: 'Significance', value: `alpha = ${step.params.alpha}` },
      ];
    case 'sample-size-plan': {
      const plan = step.params.plan;
      const lines: ParameterLine[] = [{ label: 'Goal', value: plan.goal.replace(/-/g, ' ') }];
      if ('level' in plan) lines.push({ label: 'Confidence', value: percentText(plan.level) });
      if ('alpha' in plan) lines.push({ label: 'Significance', value: `alpha = ${plan.alpha}` });
      if ('ratio' in plan) lines.push({ label: 'Ratio', value: String(plan.ratio) });
      if ('percent' in plan) lines.push({ label: 'Within', value: `± ${plan.percent} %` });
      return lines;
    }
    case 'capability': {
      const p = step.params;
      const lines: ParameterLine[] = [
        { label: 'Data', value: sourceText(p.source) },
        { label: 'Limits', value: `LSL ${p.lsl ?? '—'}, USL ${p.usl ?? '—'}` },
        { label: 'Confidence', value: percentText(p.level) },
      ];
      if (p.tolerance) {
        lines.push({
          label: 'Tolerance interval',
          value: `${percentText(p.tolerance.coverage)} coverage at ${percentText(p.tolerance.confidence)}, ${SIDES[p.tolerance.sides] ?? p.tolerance.sides}`,
        });
      }
      return lines;
    }
    case 'note':
      return [];
    default:
      return [];
  }
}
