/** Two-sample-ratio step: F test and interval for sigma1²/sigma2², with Levene and Brown-Forsythe. */
import type { StepOfKind } from '../../format/worksheet';
import { leveneTest } from '../methods/groups';
import { varianceRatioTest } from '../methods/ratio';
import type { Sample } from '../methods/summary';
import { countValue, numberValue, pValue, texNumber, unavailableValue, STANDARD_CAUTION, type StepResult } from '../result';
import { CITE, fmt, INDEPENDENCE, normalityAssumption, percent } from './common';
import { guard, requireLevel, resolveSource, StepFailure, type RunContext } from './context';
import { fDensityPlot } from './plots';

export function runTwoSampleRatio(step: StepOfKind<'two-sample-ratio'>, ctx: RunContext, result: StepResult): void {
  const { ratio0, alternative, alpha, level } = step.params;
  const digits = ctx.digits;
  if (!Number.isFinite(ratio0) || ratio0 <= 0) throw new StepFailure('invalid-parameter', 'params.ratio0', `ratio0 must be a positive number (got ${ratio0})`);
  requireLevel(alpha, 'params.alpha', 'significance level');
  requireLevel(level, 'params.level');
  const samples = resolveSource(ctx, step.params.source);
  if (samples.length !== 2) {
    throw new StepFailure('invalid-parameter', 'params.source', `a variance ratio needs exactly two samples; the source gives ${samples.length}${samples.length > 2 ? ' (pick two with "groups")' : ''}`);
  }
  const [a, b] = samples;
  const unit = a.unit ?? b.unit;
  const t = guard({ '*': 'params.source', ratio0: 'params.ratio0', alpha: 'params.alpha', level: 'params.level' }, () =>
    varianceRatioTest(a.n, a.variance, b.n, b.variance, { ratio0, alternative, alpha, level }));
  const one = alternative !== 'two-sided';
  result.values.push(
    countValue('n1', `n (${a.label})`, a.n),
    countValue('n2', `n (${b.label})`, b.n),
    numberValue('sd1', `standard deviation (${a.label})`, a.sd, { unit, digits, symbol: 's_1' }),
    numberValue('sd2', `standard deviation (${b.label})`, b.sd, { unit, digits, symbol: 's_2' }),
    numberValue('ratio', 'variance ratio s1²/s2²', t.ratio, { digits }),
    numberValue('statistic', 'F statistic', t.statistic, { digits, symbol: 'F' }),
    countValue('df1', 'numerator degrees of freedom', t.df1),
    countValue('df2', 'denominator degrees of freedom', t.df2),
    pValue('p', 'p-value', t.pValue),
    alternative === 'less' ? unavailableValue('ratioLower', `variance ratio lower (${percent(level)})`, 'one-sided bound: no lower limit (0)') : numberValue('ratioLower', `variance ratio lower (${percent(level)})`, t.ratioLower, { digits }),
    alternative === 'greater' ? unavailableValue('ratioUpper', `variance ratio upper (${percent(level)})`, 'one-sided bound: no upper limit') : numberValue('ratioUpper', `variance ratio upper (${percent(level)})`, t.ratioUpper, { digits }),
    alternative === 'less' ? unavailableValue('sdRatioLower', `sd ratio lower (${percent(level)})`, 'one-sided bound: no lower limit (0)') : numberValue('sdRatioLower', `sd ratio lower (${percent(level)})`, t.sdRatioLower, { digits }),
    alternative === 'greater' ? unavailableValue('sdRatioUpper', `sd ratio upper (${percent(level)})`, 'one-sided bound: no upper limit') : numberValue('sdRatioUpper', `sd ratio upper (${percent(level)})`, t.sdRatioUpper, { digits }),
  );
  const h1 = alternative === 'greater' ? 'greater than' : alternative === 'less' ? 'less than' : 'different from';
  result.conclusions.push({ id: 'rejectH0', value: t.rejectH0, statement: `the F test rejects sigma1²/sigma2² = ${ratio0} in favour of a ratio ${h1} ${ratio0} at alpha = ${alpha}` });
  result.formulas.push({
    id: 'f',
    label: 'F test and interval for the variance ratio',
    symbolic: `F = \\frac{s_1^2 / s_2^2}{\\rho_0}, \\quad \\frac{s_1^2/s_2^2}{F_{1-\\alpha/2;\\,\\nu_1,\\nu_2}} \\le \\frac{\\sigma_1^2}{\\sigma_2^2} \\le \\frac{s_1^2/s_2^2}{F_{\\alpha/2;\\,\\nu_1,\\nu_2}}`,
    substituted: `F = \\frac{${texNumber(a.sd)}^2 / ${texNumber(b.sd)}^2}{${texNumber(ratio0)}} = ${texNumber(t.statistic)}, \\quad p = ${texNumber(t.pValue, 4)}${one ? '' : `, \\quad ${texNumber(t.ratioLower)} \\le \\sigma_1^2/\\sigma_2^2 \\le ${texNumber(t.ratioUpper)}`}`,
  });
  const readings: string[] = [];
  readings.push(t.rejectH0
    ? `At the ${percent(alpha)} level the F test finds the variance of ${a.label} ${h1} ${ratio0 === 1 ? 'that of ' + b.label : ratio0 + ' times that of ' + b.label} (F = ${fmt(t.statistic, digits)}, p = ${fmt(t.pValue, 3)}).`
    : `At the ${percent(alpha)} level the F test does not show the variance of ${a.label} to be ${h1} ${ratio0 === 1 ? 'that of ' + b.label : ratio0 + ' times that of ' + b.label} (F = ${fmt(t.statistic, digits)}, p = ${fmt(t.pValue, 3)}).`);
  if (alternative === 'two-sided') readings.push(`With ${percent(level)} confidence sigma of ${a.label} is between ${fmt(t.sdRatioLower, digits)} and ${fmt(t.sdRatioUpper, digits)} times sigma of ${b.label}, if both samples are independent and normal.`);

  if (a.sample && b.sample) {
    const groups = [{ label: a.label, sample: a.sample as Sample }, { label: b.label, sample: b.sample as Sample }];
    const lev = guard({ '*': 'params.source' }, () => leveneTest(groups, 'mean'));
    const bf = guard({ '*': 'params.source' }, () => leveneTest(groups, 'median'));
    result.values.push(
      numberValue('levene', 'Levene statistic (mean)', lev.statistic, { digits, symbol: 'W' }),
      pValue('leveneP', 'Levene p-value', lev.pValue),
      numberValue('brownForsythe', 'Brown-Forsythe statistic (median)', bf.statistic, { digits, symbol: 'W' }),
      pValue('brownForsytheP', 'Brown-Forsythe p-value', bf.pValue),
    );
    result.conclusions.push(
      { id: 'leveneRejects', value: lev.pValue < alpha, statement: `Levene's test (mean-centred) finds unequal variances at alpha = ${alpha}` },
      { id: 'brownForsytheRejects', value: bf.pValue < alpha, statement: `the Brown-Forsythe test (median-centred) finds unequal variances at alpha = ${alpha}` },
    );
    result.formulas.push({
      id: 'levene',
      label: 'Levene / Brown-Forsythe',
      symbolic: 'W = \\frac{(N-k)\\sum_j n_j(\\bar z_j-\\bar z)^2}{(k-1)\\sum_j\\sum_i (z_{ij}-\\bar z_j)^2},\\quad z_{ij} = |x_{ij} - c_j|,\\; c_j = \\text{mean (Levene) or median (Brown-Forsythe)}',
      substituted: `W_{\\text{mean}} = ${texNumber(lev.statistic)}\\;(p = ${texNumber(lev.pValue, 4)}),\\quad W_{\\text{median}} = ${texNumber(bf.statistic)}\\;(p = ${texNumber(bf.pValue, 4)})`,
    });
    readings.push(`The robust Brown-Forsythe test, which does not need normality, gives p = ${fmt(bf.pValue, 3)}${(bf.pValue < alpha) !== t.rejectH0 ? ', a different verdict from the F test: trust it over the F test if the data may not be normal' : ''}.`);
    result.sources.push(CITE.nistF, CITE.levene, CITE.brownForsythe);
  } else {
    result.values.push(unavailableValue('levene', 'Levene statistic (mean)', 'needs the individual values of both samples'), unavailableValue('brownForsythe', 'Brown-Forsythe statistic (median)', 'needs the individual values of both samples'));
    result.sources.push(CITE.nistF);
  }
  result.reading = readings.join(' ');
  result.plot = fDensityPlot(t.df1, t.df2, t.statistic, t.criticalLower, t.criticalUpper, `F distribution with (${t.df1}, ${t.df2}) df under H0`);
  result.assumptions.push(INDEPENDENCE, normalityAssumption('The F test and its interval'));
  result.caution = STANDARD_CAUTION;
}
