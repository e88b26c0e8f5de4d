/**
 * Planning the number of measurements for a statement about σ.
 *
 * Interval ratio (common practice): the two-sided chi-square interval for σ at level 1 − α has
 * upper/lower = sqrt(χ²_{1−α/2,ν} / χ²_{α/2,ν}) (for σ²: without the square root), which does not
 * depend on the data; the plan is the smallest n = ν + 1 with that ratio ≤ the target.
 *
 * Relative precision ± d on σ at confidence γ, two criteria:
 * - "exact": smallest n with P(|s/σ − 1| < d) ≥ γ, i.e.
 *   P((1 − d)² ν < χ²_ν < (1 + d)² ν) ≥ γ, ν = n − 1 (computed: 19208, 769, 193, 49, 23, 13, 9
 *   for d = 1, 5, 10, 20, 30, 40, 50 % at γ = 0.95).
 * - "greenwood-sandomire": the normal approximation s ≈ N(σ, σ²/(2n)) behind the table of
 *   Greenwood & Sandomire (1950), "Sample size required for estimating the standard deviation as a
 *   per cent of its true value", JASA 45, 257–260: n = (z_{(1+γ)/2} / d)² / 2 rounded to the nearest
 *   integer. It reproduces the tabulated 768, 192, 48, 21, 12, 8 (5 % … 50 %); for 1 % the formula
 *   gives 19207 where the table prints 19205 (0.01 % apart; the table's own rounding).
 *
 * Power of the chi-square test of σ = σ₀ when the true σ = λσ₀ (NIST/SEMATECH e-Handbook 7.2.3.2):
 *   greater: P(χ²_ν > χ²_{1−α,ν} / λ²);  less: P(χ²_ν < χ²_{α,ν} / λ²);
 *   two-sided: P(χ²_ν < χ²_{α/2,ν}/λ²) + P(χ²_ν > χ²_{1−α/2,ν}/λ²).
 * For the one-sided test the degrees of freedom for power 1 − β solve
 *   χ²_{1−α,ν} / χ²_{β,ν} = λ² (greater) — a continuous ν, rounded up; NIST 7.2.3.2: variance
 *   ratio 1.55, α = 0.05, β = 0.01 → ν = 169.33 → 170.
 * Power of the F test of σ₁ = σ₂ when σ₁/σ₂ = λ (equal n per group, ν = n − 1):
 *   greater: P(F_{ν,ν} > F_{1−α}/λ²), less: P(F < F_α/λ²), two-sided: the sum of both tails.
 */
import { chisqCdf, chisqQuantile, chisqQuantileUpper, chisqSf, fCdf, fQuantile, fQuantileUpper, fSf, normQuantileUpper } from '../distributions/index';
import { MethodInputError, requirePositive, requireProbability } from './errors';
import { findRoot, smallestInteger } from './numeric';
import type { Alternative } from './target-test';

const MAX_N = 1e8;

export function intervalRatio(n: number, level: number, scale: 'sigma' | 'variance'): number {
  const alpha = 1 - level;
  const df = n - 1;
  const r = chisqQuantileUpper(alpha / 2, df) / chisqQuantile(alpha / 2, df);
  return scale === 'sigma' ? Math.sqrt(r) : r;
}

export function sampleSizeForIntervalRatio(level: number, ratio: number, scale: 'sigma' | 'variance' = 'sigma'): number {
  requireProbability(level, 'level');
  if (!Number.isFinite(ratio) || ratio <= 1) throw new MethodInputError('invalid-parameter', 'ratio', `the ratio upper/lower must be greater than 1 (got ${ratio})`);
  const n = smallestInteger((m) => intervalRatio(m, level, scale) <= ratio, 2, MAX_N);
  if (n === null) throw new MethodInputError('invalid-parameter', 'ratio', `the ratio ${ratio} needs more than ${MAX_N} measurements`);
  return n;
}

/** P(|s/σ − 1| < d) for n measurements of a normal quantity. */
export function relativePrecisionProbability(n: number, d: number): number {
  const df = n - 1;
  const hi = (1 + d) * (1 + d) * df;
  const lo = (1 - d) * (1 - d) * df;
  // The mass between two quantiles: subtract the smaller tail pieces to keep precision.
  return 1 - chisqCdf(lo, df) - chisqSf(hi, df);
}

export function sampleSizeForRelativePrecision(level: number, percent: number, criterion: 'exact' | 'greenwood-sandomire'): number {
  requireProbability(level, 'level');
  if (!Number.isFinite(percent) || percent <= 0 || percent >= 100) {
    throw new MethodInputError('invalid-parameter', 'percent', `the precision d must lie strictly between 0 and 100 percent (got ${percent})`);
  }
  const d = percent / 100;
  if (criterion === 'greenwood-sandomire') {
    const z = normQuantileUpper((1 - level) / 2);
    return Math.max(2, Math.round((z / d) ** 2 / 2));
  }
  const n = smallestInteger((m) => relativePrecisionProbability(m, d) >= level, 2, MAX_N);
  if (n === null) throw new MethodInputError('invalid-parameter', 'percent', `± ${percent} % needs more than ${MAX_N} measurements`);
  return n;
}

function checkPowerInputs(alpha: number, ratio: number): void {
  requireProbability(alpha, 'alpha', 'significance level');
  requirePositive(ratio, 'ratio', 'the true ratio');
  if (ratio === 1) throw new MethodInputError('invalid-parameter', 'ratio', 'the true ratio must differ from 1 (at ratio 1 the power equals alpha)');
}

/** Power of the chi-square test with n measurements when the true σ / σ₀ = ratio. */
export function chiSquarePower(n: number, alpha: number, ratio: number, alternative: Alternative): number {
  const df = n - 1;
  const l2 = ratio * ratio;
  if (alternative === 'greater') return chisqSf(chisqQuantileUpper(alpha, df) / l2, df);
  if (alternative === 'less') return chisqCdf(chisqQuantile(alpha, df) / l2, df);
  return chisqCdf(chisqQuantile(alpha / 2, df) / l2, df) + chisqSf(chisqQuantileUpper(alpha / 2, df) / l2, df);
}

/** Power of the two-sided or one-sided F test with n per group when the true σ₁/σ₂ = ratio. */
export function fTestPower(n: number, alpha: number, ratio: number, alternative: Alternative): number {
  const df = n - 1;
  const l2 = ratio * ratio;
  if (alternative === 'greater') return fSf(fQuantileUpper(alpha, df, df) / l2, df, df);
  if (alternative === 'less') return fCdf(fQuantile(alpha, df, df) / l2, df, df);
  return fCdf(fQuantile(alpha / 2, df, df) / l2, df, df) + fSf(fQuantileUpper(alpha / 2, df, df) / l2, df, df);
}

function requireDirection(ratio: number, alternative: Alternative): void {
  if ((alternative === 'greater' && ratio < 1) || (alternative === 'less' && ratio > 1)) {
    throw new MethodInputError('invalid-parameter', 'ratio', `a ratio of ${ratio} lies on the side the "${alternative}" test does not look at; the power would never reach the target`);
  }
}

export function sampleSizeForChiSquarePower(alpha: number, ratio: number, alternative: Alternative, power: number): number {
  checkPowerInputs(alpha, ratio);
  requireProbability(power, 'power', 'required power');
  requireDirection(ratio, alternative);
  const n = smallestInteger((m) => chiSquarePower(m, alpha, ratio, alternative) >= power, 2, MAX_N);
  if (n === null) throw new MethodInputError('invalid-parameter', 'power', `the power ${power} needs more than ${MAX_N} measurements`);
  return n;
}

export function sampleSizeForFPower(alpha: number, ratio: number, alternative: Alternative, power: number): number {
  checkPowerInputs(alpha, ratio);
  requireProbability(power, 'power', 'required power');
  requireDirection(ratio, alternative);
  const n = smallestInteger((m) => fTestPower(m, alpha, ratio, alternative) >= power, 2, 1e7);
  if (n === null) throw new MethodInputError('invalid-parameter', 'power', `the power ${power} needs more than 1e7 measurements per group`);
  return n;
}

/**
 * The continuous degrees of freedom at which the one-sided chi-square test reaches power 1 − β:
 * solves χ²_{1−α,ν}/χ²_{β,ν} = λ² (greater) or χ²_{1−β,ν}/χ²_{α,ν} = 1/λ² (less).
 */
export function chiSquarePowerDf(alpha: number, ratio: number, alternative: 'greater' | 'less', power: number): number {
  checkPowerInputs(alpha, ratio);
  requireProbability(power, 'power', 'required power');
  requireDirection(ratio, alternative);
  const beta = 1 - power;
  const target = alternative === 'greater' ? ratio * ratio : 1 / (ratio * ratio);
  const g = (df: number) =>
    Math.log(alternative === 'greater'
      ? chisqQuantileUpper(alpha, df) / chisqQuantile(beta, df)
      : chisqQuantileUpper(beta, df) / chisqQuantile(alpha, df)) - Math.log(target);
  let hi = 2;
  while (g(hi) > 0) {
    hi *= 2;
    if (hi > MAX_N) throw new MethodInputError('invalid-parameter', 'power', 'the required power needs too many measurements');
  }
  return findRoot(g, hi === 2 ? 1e-3 : hi / 2, hi, 1e-12);
}

export interface PowerPoint {
  ratio: number;
  power: number;
}

/** Power against the true ratio, for plotting: `count` points from 1 to `maxRatio` (or 1/maxRatio). */
export function powerCurve(power: (ratio: number) => number, maxRatio: number, count = 41): PowerPoint[] {
  const points: PowerPoint[] = [];
  const lo = Math.min(1, maxRatio);
  const hi = Math.max(1, maxRatio);
  for (let i = 0; i < count; i++) {
    const ratio = lo + ((hi - lo) * i) / (count - 1);
    points.push({ ratio, power: power(ratio) });
  }
  return points;
}
