/**
 * One-sample chi-square test of a variance against a required value σ₀ (NIST/SEMATECH
 * e-Handbook 1.3.5.8 and 7.2.3): T = (n − 1) s² / σ₀², ν = n − 1.
 *   greater (H1 σ > σ₀):   p = P(χ²_ν ≥ T), reject when T > χ²_{1−α,ν}
 *   less    (H1 σ < σ₀):   p = P(χ²_ν ≤ T), reject when T < χ²_{α,ν}
 *   two-sided:             p = 2 min(P(χ² ≤ T), P(χ² ≥ T)) (capped at 1),
 *                          reject when T < χ²_{α/2,ν} or T > χ²_{1−α/2,ν}
 * Example (NIST 7.2.3, silicon wafers): n = 10, s = 13.97, σ₀ = 10 → T = 17.56448, upper critical
 * 16.919 at α = 0.05, p (greater) = 0.04058.
 */
import { chisqCdf, chisqQuantile, chisqQuantileUpper, chisqSf } from '../distributions/index';
import { MethodInputError, requirePositive, requireProbability } from './errors';

export type Alternative = 'two-sided' | 'greater' | 'less';

export interface ChiSquareTest {
  statistic: number;
  df: number;
  pValue: number;
  alternative: Alternative;
  alpha: number;
  /** Rejection below this (two-sided and less). */
  criticalLower: number | null;
  /** Rejection above this (two-sided and greater). */
  criticalUpper: number | null;
  rejectH0: boolean;
}

export function chiSquareVarianceTest(n: number, variance: number, sigma0: number, alternative: Alternative, alpha: number): ChiSquareTest {
  if (!Number.isInteger(n) || n < 2) throw new MethodInputError('insufficient-data', 'n', `needs n ≥ 2 (got ${n})`);
  requirePositive(sigma0, 'sigma0', 'sigma0 (the required standard deviation)');
  requireProbability(alpha, 'alpha', 'significance level');
  if (!Number.isFinite(variance)) throw new MethodInputError('non-finite', 's', 'the sample variance is not finite');
  if (variance === 0) throw new MethodInputError('zero-variance', 's', 'the sample variance is zero: every value is the same');
  const df = n - 1;
  const statistic = (df * variance) / (sigma0 * sigma0);
  const lowerTail = chisqCdf(statistic, df);
  const upperTail = chisqSf(statistic, df);
  let pValue: number;
  let criticalLower: number | null = null;
  let criticalUpper: number | null = null;
  if (alternative === 'greater') {
    pValue = upperTail;
    criticalUpper = chisqQuantileUpper(alpha, df);
  } else if (alternative === 'less') {
    pValue = lowerTail;
    criticalLower = chisqQuantile(alpha, df);
  } else {
    pValue = Math.min(1, 2 * Math.min(lowerTail, upperTail));
    criticalLower = chisqQuantile(alpha / 2, df);
    criticalUpper = chisqQuantileUpper(alpha / 2, df);
  }
  const rejectH0 = (criticalLower !== null && statistic < criticalLower) || (criticalUpper !== null && statistic > criticalUpper);
  return { statistic, df, pValue, alternative, alpha, criticalLower, criticalUpper, rejectH0 };
}
