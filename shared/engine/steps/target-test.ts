/** Target-test step: chi-square test of sigma against a required sigma0. */
import type { StepOfKind } from '../../format/worksheet';
import { chiSquareVarianceTest } from '../methods/target-test';
import { countValue, numberValue, pValue, texNumber, unavailableValue, STANDARD_CAUTION, type StepResult } from '../result';
import { CITE, fmt, INDEPENDENCE, normalityAssumption, percent, withUnit } from './common';
import { guard, requireLevel, StepFailure, type RunContext } from './context';
import { chiSquareDensityPlot } from './plots';
import { resolveOne } from './single';

export function runTargetTest(step: StepOfKind<'target-test'>, ctx: RunContext, result: StepResult): void {
  const { sigma0, alternative, alpha } = step.params;
  const digits = ctx.digits;
  if (!Number.isFinite(sigma0) || sigma0 <= 0) throw new StepFailure('invalid-parameter', 'params.sigma0', `sigma0, the required standard deviation, must be a positive number (got ${sigma0})`);
  requireLevel(alpha, 'params.alpha', 'significance level');
  const r = resolveOne(ctx, step.params.source, 'The target test');
  const unit = r.unit;
  const t = guard({ sigma0: 'params.sigma0', alpha: 'params.alpha', '*': 'params.source' }, () => chiSquareVarianceTest(r.n, r.variance, sigma0, alternative, alpha));
  result.values.push(
    countValue('n', 'n', r.n),
    numberValue('sd', 'standard deviation', r.sd, { unit, digits, symbol: 's' }),
    numberValue('sigma0', 'required sigma', sigma0, { unit, digits, symbol: '\\sigma_0' }),
    numberValue('statistic', 'chi-square statistic', t.statistic, { digits, symbol: '\\chi^2' }),
    countValue('df', 'degrees of freedom', t.df, { symbol: '\\nu' }),
    pValue('p', 'p-value', t.pValue),
    t.criticalLower !== null ? numberValue('criticalLower', 'lower critical value', t.criticalLower, { digits }) : unavailableValue('criticalLower', 'lower critical value', 'the test has no lower rejection region'),
    t.criticalUpper !== null ? numberValue('criticalUpper', 'upper critical value', t.criticalUpper, { digits }) : unavailableValue('criticalUpper', 'upper critical value', 'the test has no upper rejection region'),
  );
  const h1 = alternative === 'greater' ? 'greater than' : alternative === 'less' ? 'less than' : 'different from';
  const h1Tex = alternative === 'greater' ? '>' : alternative === 'less' ? '<' : '\\ne';
  result.conclusions.push({ id: 'rejectH0', value: t.rejectH0, statement: `H0 (sigma = ${fmt(sigma0, digits)}) is rejected in favour of sigma ${h1} ${fmt(sigma0, digits)} at alpha = ${alpha}` });
  const pTail = alternative === 'greater' ? 'P(\\chi^2_\\nu \\ge T)' : alternative === 'less' ? 'P(\\chi^2_\\nu \\le T)' : '2\\min\\{P(\\chi^2_\\nu \\le T),\\,P(\\chi^2_\\nu \\ge T)\\}';
  result.formulas.push({
    id: 'statistic',
    label: `chi-square test, H1: sigma ${h1} sigma0`,
    symbolic: `T = \\frac{(n-1)\\,s^2}{\\sigma_0^2}, \\quad p = ${pTail}, \\quad H_1: \\sigma ${h1Tex} \\sigma_0`,
    substituted: `T = \\frac{${r.n - 1} \\times ${texNumber(r.sd)}^2}{${texNumber(sigma0)}^2} = ${texNumber(t.statistic)}, \\quad p = ${texNumber(t.pValue, 4)}`,
  });
  const level = 1 - alpha;
  result.reading = t.rejectH0
    ? `At the ${percent(alpha)} significance level the data give evidence that sigma is ${h1} the required ${withUnit(fmt(sigma0, digits), unit)} (chi-square = ${fmt(t.statistic, digits)}, ${t.df} degrees of freedom, p = ${fmt(t.pValue, 3)}), if the measurements are independent and normal.`
    : `At the ${percent(alpha)} significance level the data do not show that sigma is ${h1} the required ${withUnit(fmt(sigma0, digits), unit)} (chi-square = ${fmt(t.statistic, digits)}, p = ${fmt(t.pValue, 3)}); this is not proof that it is not: the test may lack power at n = ${r.n} (see a sample-size plan).`;
  void level;
  result.plot = chiSquareDensityPlot(t.df, t.statistic, t.criticalLower, t.criticalUpper, `Chi-square distribution with ${t.df} df under H0`);
  result.assumptions.push(INDEPENDENCE, normalityAssumption('The chi-square test'));
  result.sources.push(CITE.nistChiSquare);
  result.caution = STANDARD_CAUTION;
}
