/** Spread summary step: n, mean, variance, sd, CV, min, max, median, quartiles, per group. */
import type { StepOfKind } from '../../format/worksheet';
import { Sample, spreadSummary } from '../methods/summary';
import { countValue, locationDigits, numberValue, squaredUnit, texNumber, unavailableValue, STANDARD_CAUTION, type ResultValue, type StepResult } from '../result';
import { CITE, fmt, INDEPENDENCE, plural, withUnit } from './common';
import { resolveSource, type ResolvedSample, type RunContext } from './context';
import { boxPlot, histogramWithNormal } from './plots';

const RAW_ONLY = 'needs the individual values; only summary statistics were given';

function summaryCells(r: ResolvedSample, digits: number): ResultValue[] {
  const unit = r.unit;
  const cells: ResultValue[] = [countValue('n', 'n', r.n), countValue('excluded', 'cells left out', r.excluded)];
  const num = (id: string, label: string, v: number | null, u = unit, symbol?: string, d = digits) =>
    cells.push(numberValue(id, label, v, { unit: u, digits: d, symbol, reasonIfMissing: v === null ? RAW_ONLY : 'could not be computed' }));
  const loc = (id: string, label: string, v: number | null, symbol?: string) => num(id, label, v, unit, symbol, v === null ? digits : locationDigits(v, r.sd, digits));
  loc('mean', 'mean', r.mean, '\\bar{x}');
  num('variance', 'variance', r.variance, squaredUnit(unit), 's^2');
  num('sd', 'standard deviation', r.sd, unit, 's');
  if (r.mean === null) cells.push(unavailableValue('cv', 'coefficient of variation', 'needs the mean'));
  else if (r.mean === 0) cells.push(unavailableValue('cv', 'coefficient of variation', 'the mean is zero'));
  else cells.push(numberValue('cv', 'coefficient of variation', r.sd / Math.abs(r.mean), { digits, unit: undefined }));
  if (r.sample) {
    const s = spreadSummary(r.sample);
    loc('min', 'minimum', s.min);
    loc('q1', 'first quartile', s.q1);
    loc('median', 'median', s.median);
    loc('q3', 'third quartile', s.q3);
    loc('max', 'maximum', s.max);
    num('range', 'range', s.range);
    num('iqr', 'interquartile range', s.iqr);
  } else {
    for (const [id, label] of [['min', 'minimum'], ['q1', 'first quartile'], ['median', 'median'], ['q3', 'third quartile'], ['max', 'maximum'], ['range', 'range'], ['iqr', 'interquartile range']]) {
      cells.push(unavailableValue(id, label, RAW_ONLY, { unit }));
    }
  }
  return cells;
}

export function runSpreadSummary(step: StepOfKind<'spread-summary'>, ctx: RunContext, result: StepResult): void {
  const digits = ctx.digits;
  const samples = resolveSource(ctx, step.params.source, { allowZeroVariance: true });
  const unit = samples[0].unit;
  const rows = samples.map((r) => ({ id: r.label, label: r.label, cells: summaryCells(r, digits) }));
  if (samples.length > 1 && samples.every((s) => s.sample)) {
    const all = new Float64Array(samples.reduce((t, s) => t + s.n, 0));
    let at = 0;
    for (const s of samples) {
      all.set((s.sample as Sample).values, at);
      at += s.n;
    }
    const pooled = Sample.of(all, 2);
    const m = pooled.moments;
    const overall: ResolvedSample = {
      label: 'all groups', quantity: samples[0].quantity.replace(/ \(.*\)$/, ''), key: null, n: m.n, mean: m.mean, variance: m.variance, sd: m.sd, sample: pooled,
      excluded: samples.reduce((t, s) => t + s.excluded, 0),
    };
    if (unit !== undefined) overall.unit = unit;
    rows.push({ id: '(all)', label: 'all groups', cells: summaryCells(overall, digits) });
  }
  const first = rows[0].cells;
  result.tables.push({
    id: 'summary',
    title: samples.length > 1 ? 'Spread by group' : 'Spread summary',
    columns: first.map((c) => ({ id: c.id, label: c.label, ...(c.unit ? { unit: c.unit } : {}) })),
    rows,
  });
  // Headline values: the single sample, or the combined data of all groups.
  const head = rows[rows.length - 1].cells;
  result.values.push(...head);

  const primary = samples.length === 1 ? samples[0] : null;
  if (primary) {
    const n = primary.n;
    result.formulas.push({
      id: 'variance',
      label: 'sample variance',
      symbolic: 's^2 = \\frac{1}{n-1}\\sum_{i=1}^{n}(x_i-\\bar{x})^2, \\quad s = \\sqrt{s^2}',
      substituted: `s^2 = \\frac{${texNumber(primary.variance * (n - 1))}}{${n - 1}} = ${texNumber(primary.variance)}, \\quad s = ${texNumber(primary.sd)}`,
    });
    result.reading = `${plural(n, 'value')}${primary.excluded ? ` (${plural(primary.excluded, 'cell')} left out)` : ''}: mean ${withUnit(primary.mean === null ? 'not given' : fmt(primary.mean, locationDigits(primary.mean, primary.sd, digits)), unit)}, standard deviation ${withUnit(fmt(primary.sd, digits), unit)}. The standard deviation is an estimate; a sigma-interval step says how sure it is.`;
    if (primary.variance === 0) result.warnings.push({ code: 'zero-variance', message: 'All values are equal: the measurement resolution may be too coarse to show the spread.' });
  } else {
    result.formulas.push({
      id: 'variance',
      label: 'sample variance of each group',
      symbolic: 's_j^2 = \\frac{1}{n_j-1}\\sum_{i=1}^{n_j}(x_{ij}-\\bar{x}_j)^2',
      substituted: samples.map((s) => `s_{\\text{${s.label.replace(/[{}\\]/g, '')}}} = ${texNumber(s.sd)}`).join(',\\; '),
    });
    const sds = samples.map((s) => s.sd);
    const lo = samples[sds.indexOf(Math.min(...sds))];
    const hi = samples[sds.indexOf(Math.max(...sds))];
    result.reading = `${plural(samples.length, 'group')}; the standard deviation ranges from ${withUnit(fmt(lo.sd, digits), unit)} (${lo.label}) to ${withUnit(fmt(hi.sd, digits), unit)} (${hi.label}). Whether such differences are more than chance is for a group-comparison step.`;
  }
  const raw = samples.filter((s) => s.sample);
  if (primary?.sample) {
    result.plot = histogramWithNormal(primary.sample.sorted(), primary.mean as number, primary.sd, primary.quantity, unit);
  } else if (raw.length > 1) {
    result.plot = boxPlot(raw.map((s) => ({ label: s.label, sorted: (s.sample as Sample).sorted() })), raw[0].quantity.replace(/ \(.*\)$/, ''), unit);
  }
  result.assumptions.push(INDEPENDENCE);
  result.sources.push(CITE.chanGolubLeVeque, CITE.hyndmanFan);
  result.caution = STANDARD_CAUTION;
}
