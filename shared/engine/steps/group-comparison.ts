/** Group-comparison step: Bartlett, Levene, Brown-Forsythe and the one-way ANOVA table. */
import type { StepOfKind } from '../../format/worksheet';
import { bartlettTest, leveneTest, oneWayAnova, type GroupStats } from '../methods/groups';
import type { Sample } from '../methods/summary';
import { countValue, numberValue, pValue, texNumber, unavailableValue, STANDARD_CAUTION, type ResultValue, type StepResult } from '../result';
import { CITE, fmt, INDEPENDENCE, normalityAssumption, percent, plural } from './common';
import { guard, requireLevel, resolveSource, StepFailure, type RunContext } from './context';
import { boxPlot } from './plots';

export function runGroupComparison(step: StepOfKind<'group-comparison'>, ctx: RunContext, result: StepResult): void {
  const { alpha } = step.params;
  const digits = ctx.digits;
  requireLevel(alpha, 'params.alpha', 'significance level');
  const samples = resolveSource(ctx, step.params.source, { allowZeroVariance: true });
  if (samples.length < 2) throw new StepFailure('insufficient-data', 'params.source.groupBy', `a group comparison needs at least 2 groups (got ${samples.length}); set groupBy to the column that names the groups`);
  const stats: GroupStats[] = samples.map((s) => ({ label: s.label, n: s.n, mean: s.mean, variance: s.variance }));
  const unit = samples[0].unit;
  const k = samples.length;
  const N = samples.reduce((t, s) => t + s.n, 0);
  result.values.push(countValue('groups', 'groups', k), countValue('n', 'total n', N));

  const tests: { id: string; label: string; cells: ResultValue[] }[] = [];
  const readings: string[] = [];
  const bart = guard({ '*': 'params.source' }, () => bartlettTest(stats));
  result.values.push(numberValue('bartlett', 'Bartlett statistic', bart.statistic, { digits, symbol: 'K^2' }), pValue('bartlettP', 'Bartlett p-value', bart.pValue));
  result.conclusions.push({ id: 'bartlettRejects', value: bart.pValue < alpha, statement: `Bartlett's test finds unequal variances at alpha = ${alpha}` });
  tests.push({ id: 'bartlett', label: 'Bartlett', cells: [numberValue('statistic', 'statistic', bart.statistic, { digits }), numberValue('df', 'df', bart.df, { digits: 4 }), pValue('p', 'p-value', bart.pValue)] });
  result.formulas.push({
    id: 'bartlett',
    label: "Bartlett's test",
    symbolic: 'K^2 = \\frac{(N-k)\\ln s_p^2 - \\sum_j (n_j-1)\\ln s_j^2}{1 + \\frac{1}{3(k-1)}\\left(\\sum_j \\frac{1}{n_j-1} - \\frac{1}{N-k}\\right)}',
    substituted: `K^2 = ${texNumber(bart.statistic)},\\; s_p^2 = ${texNumber(bart.pooledVariance)},\\; \\nu = ${bart.df},\\; p = ${texNumber(bart.pValue, 4)}`,
  });
  readings.push(`Bartlett's test (normal theory) ${bart.pValue < alpha ? 'finds' : 'does not find'} evidence that the ${plural(k, 'group')} differ in variance (p = ${fmt(bart.pValue, 3)}).`);

  const raw = samples.every((s) => s.sample);
  if (raw) {
    const groups = samples.map((s) => ({ label: s.label, sample: s.sample as Sample }));
    const lev = guard({ '*': 'params.source' }, () => leveneTest(groups, 'mean'));
    const bf = guard({ '*': 'params.source' }, () => leveneTest(groups, 'median'));
    result.values.push(
      numberValue('levene', 'Levene statistic (mean)', lev.statistic, { digits, symbol: 'W' }), pValue('leveneP', 'Levene p-value', lev.pValue),
      numberValue('brownForsythe', 'Brown-Forsythe statistic (median)', bf.statistic, { digits, symbol: 'W' }), pValue('brownForsytheP', 'Brown-Forsythe p-value', bf.pValue),
    );
    result.conclusions.push(
      { id: 'leveneRejects', value: lev.pValue < alpha, statement: `Levene's test (mean-centred) finds unequal variances at alpha = ${alpha}` },
      { id: 'brownForsytheRejects', value: bf.pValue < alpha, statement: `the Brown-Forsythe test (median-centred) finds unequal variances at alpha = ${alpha}` },
    );
    tests.push(
      { id: 'levene', label: 'Levene (mean)', cells: [numberValue('statistic', 'statistic', lev.statistic, { digits }), numberValue('df', 'df', lev.df1, { digits: 4 }), pValue('p', 'p-value', lev.pValue)] },
      { id: 'brown-forsythe', label: 'Brown-Forsythe (median)', cells: [numberValue('statistic', 'statistic', bf.statistic, { digits }), numberValue('df', 'df', bf.df1, { digits: 4 }), pValue('p', 'p-value', bf.pValue)] },
    );
    result.formulas.push({
      id: 'levene',
      label: 'Levene / Brown-Forsythe',
      symbolic: 'W = \\frac{(N-k)\\sum_j n_j(\\bar z_j-\\bar z)^2}{(k-1)\\sum_j\\sum_i (z_{ij}-\\bar z_j)^2},\\quad z_{ij} = |x_{ij} - c_j|',
      substituted: `W_{\\text{mean}} = ${texNumber(lev.statistic)}\\;(p = ${texNumber(lev.pValue, 4)}),\\; W_{\\text{median}} = ${texNumber(bf.statistic)}\\;(p = ${texNumber(bf.pValue, 4)}),\\; \\nu = (${lev.df1}, ${lev.df2})`,
    });
    readings.push(`The Brown-Forsythe test, robust to non-normal data, ${bf.pValue < alpha ? 'finds' : 'does not find'} such evidence (p = ${fmt(bf.pValue, 3)}); Levene's mean-centred version gives p = ${fmt(lev.pValue, 3)}.`);
    result.sources.push(CITE.bartlett, CITE.levene, CITE.brownForsythe);
  } else {
    result.values.push(unavailableValue('levene', 'Levene statistic (mean)', 'needs the individual values of every group'), unavailableValue('brownForsythe', 'Brown-Forsythe statistic (median)', 'needs the individual values of every group'));
    result.warnings.push({ code: 'robust-not-available', message: 'Only summary statistics were given, so the robust Levene and Brown-Forsythe tests are not available; Bartlett\'s test is sensitive to non-normality.' });
    result.sources.push(CITE.bartlett);
  }
  result.tables.push({ id: 'tests', title: 'Tests of equal variances', columns: [{ id: 'statistic', label: 'statistic' }, { id: 'df', label: 'df (numerator)' }, { id: 'p', label: 'p-value' }], rows: tests });

  if (stats.every((s) => s.mean !== null)) {
    const a = guard({ '*': 'params.source' }, () => oneWayAnova(stats));
    const row = (id: string, label: string, df: number, ss: number, ms: number | null, f: number | null, p: number | null) => ({
      id, label, cells: [
        countValue('df', 'df', df),
        numberValue('ss', 'sum of squares', ss, { digits }),
        ms === null ? unavailableValue('ms', 'mean square', '—') : numberValue('ms', 'mean square', ms, { digits }),
        f === null ? unavailableValue('f', 'F', '—') : numberValue('f', 'F', f, { digits }),
        p === null ? unavailableValue('p', 'p-value', '—') : pValue('p', 'p-value', p),
      ],
    });
    result.tables.push({
      id: 'anova',
      title: 'One-way ANOVA (equality of the group means)',
      columns: [{ id: 'df', label: 'df' }, { id: 'ss', label: 'sum of squares' }, { id: 'ms', label: 'mean square' }, { id: 'f', label: 'F' }, { id: 'p', label: 'p-value' }],
      rows: [
        row('between', 'between groups', a.dfBetween, a.ssBetween, a.msBetween, a.f, a.pValue),
        row('within', 'within groups', a.dfWithin, a.ssWithin, a.msWithin, null, null),
        row('total', 'total', a.dfTotal, a.ssTotal, null, null, null),
      ],
    });
    result.values.push(numberValue('anovaF', 'ANOVA F (means)', a.f, { digits, symbol: 'F' }), pValue('anovaP', 'ANOVA p-value', a.pValue));
    result.conclusions.push({ id: 'anovaRejects', value: a.pValue < alpha, statement: `the one-way ANOVA finds that the group means differ at alpha = ${alpha}` });
    result.formulas.push({
      id: 'anova',
      label: 'one-way ANOVA',
      symbolic: 'F = \\frac{\\sum_j n_j(\\bar x_j - \\bar x)^2/(k-1)}{\\sum_j (n_j-1)s_j^2/(N-k)}',
      substituted: `F = \\frac{${texNumber(a.ssBetween)}/${a.dfBetween}}{${texNumber(a.ssWithin)}/${a.dfWithin}} = ${texNumber(a.f)},\\; p = ${texNumber(a.pValue, 4)}`,
    });
    readings.push(`The one-way ANOVA ${a.pValue < alpha ? 'finds' : 'does not find'} a difference between the group means at the ${percent(alpha)} level (p = ${fmt(a.pValue, 3)}); its F test assumes equal variances.`);
    result.sources.push(CITE.anova);
  }
  if (raw) result.plot = boxPlot(samples.map((s) => ({ label: s.label, sorted: (s.sample as Sample).sorted() })), samples[0].quantity.replace(/ \(.*\)$/, ''), unit);
  result.reading = readings.join(' ');
  result.assumptions.push(INDEPENDENCE, normalityAssumption("Bartlett's test and the ANOVA F"));
  result.caution = STANDARD_CAUTION;
}
