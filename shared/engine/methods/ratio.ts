/**
 * F test and confidence interval for the ratio of two variances (NIST/SEMATECH e-Handbook
 * 1.3.5.9 and 7.3.2; as R's var.test): F = (s₁² / s₂²) / ρ₀, ν₁ = n₁ − 1, ν₂ = n₂ − 1.
 *   greater: p = P(F_{ν₁,ν₂} ≥ F);  less: p = P(F ≤ F);  two-sided: p = 2 min(both), capped at 1.
 * Interval for σ₁²/σ₂² at level 1 − α (r = s₁²/s₂²):
 *   two-sided: ( r / F_{1−α/2}, r / F_{α/2} );  greater: ( r / F_{1−α}, ∞ );  less: ( 0, r / F_{α} ),
 * with upper quantiles through the survival function. Limits for σ₁/σ₂ are the square roots.
 * Example (NIST 1.3.5.9, JAHANMI2 batches): s₁ = 65.54909, s₂ = 61.85425, n = 240 each:
 *   F = 1.123037, two-sided p = 0.370383, 95 % interval for the variance ratio 0.870987 – 1.448027.
 */
import { fCdf, fQuantile, fQuantileUpper, fSf } from '../distributions/index';
import { MethodInputError, requirePositive, requireProbability } from './errors';
import type { Alternative } from './target-test';

export interface VarianceRatioTest {
  ratio: number;
  statistic: number;
  df1: number;
  df2: number;
  pValue: number;
  alternative: Alternative;
  alpha: number;
  criticalLower: number | null;
  criticalUpper: number | null;
  rejectH0: boolean;
  level: number;
  ratioLower: number;
  ratioUpper: number;
  sdRatioLower: number;
  sdRatioUpper: number;
}

export function varianceRatioTest(
  n1: number,
  variance1: number,
  n2: number,
  variance2: number,
  options: { ratio0?: number; alternative?: Alternative; alpha?: number; level?: number } = {},
): VarianceRatioTest {
  const ratio0 = options.ratio0 ?? 1;
  const alternative = options.alternative ?? 'two-sided';
  const alpha = options.alpha ?? 0.05;
  const level = options.level ?? 0.95;
  for (const [n, name] of [[n1, 'first'], [n2, 'second']] as const) {
    if (!Number.isInteger(n) || n < 2) throw new MethodInputError('insufficient-data', 'groups', `the ${name} sample has ${n} value${n === 1 ? '' : 's'}; each sample needs at least 2`);
  }
  for (const [v, name] of [[variance1, 'first'], [variance2, 'second']] as const) {
    if (!Number.isFinite(v)) throw new MethodInputError('non-finite', 'groups', `the ${name} sample variance is not finite`);
    if (v === 0) throw new MethodInputError('zero-variance', 'groups', `the ${name} sample has zero variance; the variance ratio is not defined`);
  }
  requirePositive(ratio0, 'ratio0', 'ratio0 (the hypothesised variance ratio)');
  requireProbability(alpha, 'alpha', 'significance level');
  requireProbability(level, 'level');
  const df1 = n1 - 1;
  const df2 = n2 - 1;
  const ratio = variance1 / variance2;
  const statistic = ratio / ratio0;
  const lower = fCdf(statistic, df1, df2);
  const upper = fSf(statistic, df1, df2);
  let pValue: number;
  let criticalLower: number | null = null;
  let criticalUpper: number | null = null;
  let ratioLower = 0;
  let ratioUpper = Infinity;
  const beta = 1 - level;
  if (alternative === 'greater') {
    pValue = upper;
    criticalUpper = fQuantileUpper(alpha, df1, df2);
    ratioLower = ratio / fQuantileUpper(beta, df1, df2);
  } else if (alternative === 'less') {
    pValue = lower;
    criticalLower = fQuantile(alpha, df1, df2);
    ratioUpper = ratio / fQuantile(beta, df1, df2);
  } else {
    pValue = Math.min(1, 2 * Math.min(lower, upper));
    criticalLower = fQuantile(alpha / 2, df1, df2);
    criticalUpper = fQuantileUpper(alpha / 2, df1, df2);
    ratioLower = ratio / fQuantileUpper(beta / 2, df1, df2);
    ratioUpper = ratio / fQuantile(beta / 2, df1, df2);
  }
  const rejectH0 = (criticalLower !== null && statistic < criticalLower) || (criticalUpper !== null && statistic > criticalUpper);
  return {
    ratio,
    statistic,
    df1,
    df2,
    pValue,
    alternative,
    alpha,
    criticalLower,
    criticalUpper,
    rejectH0,
    level,
    ratioLower,
    ratioUpper,
    sdRatioLower: Math.sqrt(ratioLower),
    sdRatioUpper: Math.sqrt(ratioUpper),
  };
}
