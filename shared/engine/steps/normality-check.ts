/** Normality-check step: Shapiro-Wilk, Anderson-Darling, skewness, excess kurtosis, probability plot. */
import type { StepOfKind } from '../../format/worksheet';
import { andersonDarling, probabilityPlotPoints, shapeMoments, shapiroWilk } from '../methods/normality';
import { countValue, numberValue, pValue, texNumber, unavailableValue, STANDARD_CAUTION, type StepResult } from '../result';
import { CITE, fmt, INDEPENDENCE, percent } from './common';
import { guard, requireLevel, StepFailure, type RunContext } from './context';
import { probabilityPlot } from './plots';
import { resolveOne } from './single';

/** The verdict of a normality check, attached afterwards to the steps that use the same sample. */
export interface NormalityVerdict {
  stepId: string;
  sampleKey: string;
  rejected: boolean;
  detail: string;
}

export function runNormalityCheck(step: StepOfKind<'normality-check'>, ctx: RunContext, result: StepResult): NormalityVerdict | null {
  const { alpha } = step.params;
  const digits = ctx.digits;
  requireLevel(alpha, 'params.alpha', 'significance level');
  const r = resolveOne(ctx, step.params.source, 'A normality check');
  if (!r.sample) throw new StepFailure('invalid-parameter', 'params.source', 'a normality check needs the individual values; summary statistics cannot show the shape of the distribution');
  const sample = r.sample;
  const n = r.n;
  const sorted = sample.sorted();
  result.values.push(countValue('n', 'n', n));
  const verdicts: string[] = [];
  let rejected = false;
  const tested: string[] = [];

  if (n >= 3 && n <= 5000) {
    const sw = guard({ '*': 'params.source' }, () => shapiroWilk(sorted));
    result.values.push(numberValue('shapiroW', 'Shapiro-Wilk W', sw.statistic, { digits: Math.max(digits, 5), symbol: 'W' }), pValue('shapiroP', 'Shapiro-Wilk p-value', sw.pValue));
    result.formulas.push({
      id: 'shapiro-wilk',
      label: 'Shapiro-Wilk (Royston 1995, AS R94)',
      symbolic: 'W = \\frac{\\left(\\sum_{i=1}^n a_i x_{(i)}\\right)^2}{\\sum_{i=1}^n (x_i-\\bar x)^2}',
      substituted: `W = ${texNumber(sw.statistic)},\\; n = ${n},\\; p = ${texNumber(sw.pValue, 4)}`,
    });
    tested.push('Shapiro-Wilk');
    if (sw.pValue < alpha) rejected = true;
    verdicts.push(`Shapiro-Wilk W = ${fmt(sw.statistic, 5)} (p = ${fmt(sw.pValue, 3)})`);
    result.sources.push(CITE.shapiroWilk);
  } else {
    const reason = `Shapiro-Wilk (AS R94) applies to 3 ≤ n ≤ 5000; n = ${n}`;
    result.values.push(unavailableValue('shapiroW', 'Shapiro-Wilk W', `not applicable: ${reason}`), unavailableValue('shapiroP', 'Shapiro-Wilk p-value', `not applicable: ${reason}`));
    result.warnings.push({ code: 'shapiro-not-applicable', message: `${reason}; the verdict rests on Anderson-Darling and the probability plot.` });
  }
  if (n >= 8) {
    const ad = guard({ '*': 'params.source' }, () => andersonDarling(sorted, sample.moments.mean, sample.moments.sd));
    result.values.push(
      numberValue('andersonA2', 'Anderson-Darling A²', ad.statistic, { digits, symbol: 'A^2' }),
      numberValue('andersonAdjusted', 'adjusted A*', ad.adjusted, { digits, symbol: 'A^*' }),
      pValue('andersonP', 'Anderson-Darling p-value', ad.pValue),
    );
    result.formulas.push({
      id: 'anderson-darling',
      label: "Anderson-Darling (D'Agostino & Stephens 1986)",
      symbolic: 'A^2 = -n - \\frac{1}{n}\\sum_{i=1}^n (2i-1)\\left[\\ln\\Phi(z_{(i)}) + \\ln\\left(1-\\Phi(z_{(n+1-i)})\\right)\\right],\\quad A^* = A^2\\left(1 + \\frac{0.75}{n} + \\frac{2.25}{n^2}\\right)',
      substituted: `A^2 = ${texNumber(ad.statistic)},\\; A^* = ${texNumber(ad.adjusted)},\\; p = ${texNumber(ad.pValue, 4)}`,
    });
    tested.push('Anderson-Darling');
    if (ad.pValue < alpha) rejected = true;
    verdicts.push(`Anderson-Darling A* = ${fmt(ad.adjusted, digits)} (p = ${fmt(ad.pValue, 3)})`);
    result.sources.push(CITE.andersonDarling);
  } else {
    const reason = `the Anderson-Darling p-value approximation needs n ≥ 8; n = ${n}`;
    result.values.push(unavailableValue('andersonA2', 'Anderson-Darling A²', `not applicable: ${reason}`), unavailableValue('andersonP', 'Anderson-Darling p-value', `not applicable: ${reason}`));
  }
  if (sample.moments.variance > 0) {
    const shape = shapeMoments(sample);
    result.values.push(
      numberValue('skewness', 'skewness g1', shape.skewness, { digits, symbol: 'g_1' }),
      numberValue('excessKurtosis', 'excess kurtosis g2', shape.excessKurtosis, { digits, symbol: 'g_2' }),
      shape.adjustedSkewness === null ? unavailableValue('adjustedSkewness', 'adjusted skewness G1', 'needs n ≥ 3') : numberValue('adjustedSkewness', 'adjusted skewness G1', shape.adjustedSkewness, { digits, symbol: 'G_1' }),
      shape.adjustedExcessKurtosis === null ? unavailableValue('adjustedExcessKurtosis', 'adjusted excess kurtosis G2', 'needs n ≥ 4') : numberValue('adjustedExcessKurtosis', 'adjusted excess kurtosis G2', shape.adjustedExcessKurtosis, { digits, symbol: 'G_2' }),
    );
    result.formulas.push({
      id: 'moments',
      label: 'skewness and excess kurtosis',
      symbolic: 'g_1 = \\frac{m_3}{m_2^{3/2}},\\; g_2 = \\frac{m_4}{m_2^2} - 3,\\; m_r = \\frac{1}{n}\\sum (x_i-\\bar x)^r',
      substituted: `g_1 = ${texNumber(shape.skewness)},\\; g_2 = ${texNumber(shape.excessKurtosis)}`,
    });
    result.sources.push(CITE.moments);
    if (shape.excessKurtosis > 1) result.warnings.push({ code: 'heavy-tails', message: `Excess kurtosis ${fmt(shape.excessKurtosis, 3)}: the tails look heavier than normal; chi-square and F intervals can be far too narrow.` });
  }
  if (tested.length === 0) throw new StepFailure('insufficient-data', 'params.source', `no normality test applies to n = ${n}`);
  result.conclusions.push({ id: 'normalityRejected', value: rejected, statement: `at alpha = ${alpha}, ${tested.join(' or ')} rejects normality` });
  result.reading = rejected
    ? `The data are unlikely to come from a normal distribution (${verdicts.join('; ')} at the ${percent(alpha)} level). Chi-square and F results for these data may mislead: prefer Bonett's interval and the Brown-Forsythe test.`
    : `No evidence against normality at the ${percent(alpha)} level (${verdicts.join('; ')}). This does not prove normality${n < 30 ? `, and with n = ${n} the tests have little power` : ''}; look at the probability plot too.`;
  result.plot = probabilityPlot(probabilityPlotPoints(sorted), sample.moments.mean, sample.moments.sd, r.quantity, r.unit);
  result.sources.push(CITE.blom);
  result.assumptions.push(INDEPENDENCE);
  result.caution = STANDARD_CAUTION;
  return r.key ? { stepId: step.id, sampleKey: r.key, rejected, detail: verdicts.join('; ') } : null;
}
