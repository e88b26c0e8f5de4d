/**
 * Confidence intervals for a variance σ² and a standard deviation σ.
 *
 * Chi-square interval (normal theory; e.g. NIST/SEMATECH e-Handbook 1.3.5.8 and 7.2.3;
 * ISO 16269-4 style): with ν = n − 1 and the sample variance s²,
 *   two-sided, level 1 − α:  ν s² / χ²_{1−α/2,ν} ≤ σ² ≤ ν s² / χ²_{α/2,ν}
 *   lower bound:             σ² ≥ ν s² / χ²_{1−α,ν}
 *   upper bound:             σ² ≤ ν s² / χ²_{α,ν}
 * where χ²_{p,ν} is the p-quantile; upper quantiles are taken through the survival function
 * (chisqQuantileUpper), never as 1 − p. Limits for σ are the square roots.
 * Example (gear data, NIST 1.3.5.8): n = 100, s = 0.006278905, 95 %: σ in 0.005513 – 0.007294.
 *
 * Bonett (2006), "Approximate confidence interval for standard deviation of nonnormal
 * distributions", Computational Statistics & Data Analysis 50(3), 775–782:
 *   exp( ln(c s²) ± z · se ),  c = n / (n − z),  se = c · sqrt( (γ̂₄ − (n − 3)/n) / (n − 1) ),
 *   γ̂₄ = n Σ(x − m)⁴ / (Σ(x − x̄)²)²,  m the trimmed mean with trim proportion 1 / (2 sqrt(n − 4)),
 * z = z_{1−α/2} two-sided, z_{1−α} for a one-sided bound. Rounding of the trimmed count: from each
 * end ⌊n · trim⌋ observations are dropped (floor), as R's mean(x, trim) does; needs n ≥ 5.
 * Example (gear data at 95 %, floor rounding): γ̂₄ = 4.420089, c = 1.019991,
 *   σ² in (2.768761e-05, 5.840409e-05).
 */
import { chisqQuantile, chisqQuantileUpper, normQuantileUpper } from '../distributions/index';
import { MethodInputError, requireProbability } from './errors';
import { fourthPowerSum, type Sample } from './summary';

export type Sides = 'two-sided' | 'lower' | 'upper';

export interface VarianceInterval {
  level: number;
  sides: Sides;
  /** Limits for σ²; a one-sided bound leaves the other side at 0 or +∞. */
  varianceLower: number;
  varianceUpper: number;
  sdLower: number;
  sdUpper: number;
}

export interface ChiSquareInterval extends VarianceInterval {
  df: number;
  /** Quantile dividing ν s² for the lower limit (absent for an upper bound). */
  chiUpperQuantile: number | null;
  /** Quantile dividing ν s² for the upper limit (absent for a lower bound). */
  chiLowerQuantile: number | null;
}

function checkSummary(n: number, variance: number): void {
  if (!Number.isInteger(n) || n < 2) throw new MethodInputError('insufficient-data', 'n', `needs n ≥ 2 (got ${n})`);
  if (!Number.isFinite(variance) || variance < 0) throw new MethodInputError('non-finite', 's', `the standard deviation must be a finite number ≥ 0 (got ${Math.sqrt(variance)})`);
  if (variance === 0) throw new MethodInputError('zero-variance', 's', 'the sample variance is zero: every value is the same, so no interval for the spread can be given');
}

/** Chi-square interval from n and the sample variance s². */
export function chiSquareInterval(n: number, variance: number, level: number, sides: Sides = 'two-sided'): ChiSquareInterval {
  checkSummary(n, variance);
  requireProbability(level, 'level');
  const df = n - 1;
  const alpha = 1 - level;
  const ss = df * variance;
  let chiUpperQuantile: number | null = null;
  let chiLowerQuantile: number | null = null;
  let varianceLower = 0;
  let varianceUpper = Infinity;
  if (sides === 'two-sided') {
    chiUpperQuantile = chisqQuantileUpper(alpha / 2, df);
    chiLowerQuantile = chisqQuantile(alpha / 2, df);
  } else if (sides === 'lower') {
    chiUpperQuantile = chisqQuantileUpper(alpha, df);
  } else {
    chiLowerQuantile = chisqQuantile(alpha, df);
  }
  if (chiUpperQuantile !== null) varianceLower = ss / chiUpperQuantile;
  if (chiLowerQuantile !== null) varianceUpper = ss / chiLowerQuantile;
  return {
    level,
    sides,
    df,
    chiUpperQuantile,
    chiLowerQuantile,
    varianceLower,
    varianceUpper,
    sdLower: Math.sqrt(varianceLower),
    sdUpper: Math.sqrt(varianceUpper),
  };
}

export interface BonettInterval extends VarianceInterval {
  /** γ̂₄, the kurtosis estimate with the trimmed mean. */
  kurtosis: number;
  c: number;
  se: number;
  z: number;
  trimmedMean: number;
  /** Observations dropped from each end for the trimmed mean (⌊n / (2 sqrt(n − 4))⌋). */
  trimmedCount: number;
}

/** Pieces of Bonett's interval that do not depend on the level. */
export interface BonettBasis {
  n: number;
  variance: number;
  kurtosis: number;
  trimmedMean: number;
  trimmedCount: number;
}

export function bonettBasis(sample: Sample): BonettBasis {
  const n = sample.n;
  if (n < 5) throw new MethodInputError('insufficient-data', 'values', `Bonett's interval needs n ≥ 5 (got ${n})`);
  const { variance, sumSquares } = sample.moments;
  if (variance === 0) throw new MethodInputError('zero-variance', 'values', 'the sample variance is zero: every value is the same');
  const sorted = sample.sorted();
  const trim = 1 / (2 * Math.sqrt(n - 4));
  // R's mean(x, trim): lo = floor(n * trim) + 1, hi = n + 1 - lo (1-based); trim ≥ 0.5 gives the median.
  const trimmedCount = Math.floor(n * trim);
  let trimmedMean: number;
  if (trim >= 0.5) {
    const h = n % 2 === 1 ? sorted[(n - 1) / 2] : 0.5 * (sorted[n / 2 - 1] + sorted[n / 2]);
    trimmedMean = h;
  } else {
    // One compensated pass of the deviations from the sample mean (already accurate to about an
    // ulp): the same accuracy as R's mean(x, trim), whose second pass sums the deviations from a
    // first estimate, because both sum deviations of the size of the spread, not the values; this
    // matters since γ̂₄ is sensitive to the centre when the data sit far from zero.
    const centre = sample.moments.mean;
    let r = 0;
    let rc = 0;
    for (let i = trimmedCount; i < n - trimmedCount; i++) {
      const d = sorted[i] - centre;
      const t = r + d;
      rc += Math.abs(r) >= Math.abs(d) ? r - t + d : d - t + r;
      r = t;
    }
    trimmedMean = centre + (r + rc) / (n - 2 * trimmedCount);
  }
  const s4 = fourthPowerSum(sample.values, trimmedMean);
  const kurtosis = (n * s4) / (sumSquares * sumSquares);
  return { n, variance, kurtosis, trimmedMean, trimmedCount };
}

export function bonettInterval(basis: BonettBasis, level: number, sides: Sides = 'two-sided'): BonettInterval {
  requireProbability(level, 'level');
  const { n, variance, kurtosis } = basis;
  const alpha = 1 - level;
  const z = normQuantileUpper(sides === 'two-sided' ? alpha / 2 : alpha);
  if (!(n > z)) throw new MethodInputError('insufficient-data', 'values', `Bonett's interval needs n > z = ${z} at this level`);
  const c = n / (n - z);
  const se = c * Math.sqrt((kurtosis - (n - 3) / n) / (n - 1));
  const centre = Math.log(c * variance);
  const varianceLower = sides === 'upper' ? 0 : Math.exp(centre - z * se);
  const varianceUpper = sides === 'lower' ? Infinity : Math.exp(centre + z * se);
  return {
    level,
    sides,
    varianceLower,
    varianceUpper,
    sdLower: Math.sqrt(varianceLower),
    sdUpper: Math.sqrt(varianceUpper),
    kurtosis,
    c,
    se,
    z,
    trimmedMean: basis.trimmedMean,
    trimmedCount: basis.trimmedCount,
  };
}
