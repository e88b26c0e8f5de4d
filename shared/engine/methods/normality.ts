/**
 * Checks of the normality assumption.
 *
 * Shapiro-Wilk W with Royston's approximations: Royston (1995), "Remark AS R94: A remark on
 * Algorithm AS 181: the W-test for normality", Applied Statistics 44(4), 547–551 (the algorithm
 * R's shapiro.test implements). Coefficients aᵢ from mᵢ = Φ⁻¹((i − 3/8)/(n + 1/4)) with Royston's
 * polynomial corrections of the two extreme coefficients; W is the squared correlation of the
 * ordered data with the coefficients, computed as 1 − W to keep precision near 1. p-value: exact
 * for n = 3; for 4 ≤ n ≤ 11 from a normal approximation of −ln(γ − ln(1 − W)); for n ≥ 12 from a
 * normal approximation of ln(1 − W). Valid for 3 ≤ n ≤ 5000.
 * Example (Shapiro & Wilk 1965, weights of 11 men): W = 0.78881, p = 0.006704 (R).
 *
 * Anderson-Darling with estimated mean and sd (Stephens 1974; D'Agostino & Stephens 1986,
 * "Goodness-of-Fit Techniques", Table 4.9), as nortest::ad.test: zᵢ = (x₍ᵢ₎ − x̄)/s,
 *   A² = −n − (1/n) Σ (2i − 1) [ ln Φ(zᵢ) + ln(1 − Φ(z_{n+1−i})) ],
 *   A* = A² (1 + 0.75/n + 2.25/n²), p from D'Agostino & Stephens' piecewise exponential in A*.
 * Needs n ≥ 8 (as nortest). The 5 % critical value of A* is 0.752 (NIST e-Handbook 1.3.5.14).
 *
 * Skewness and excess kurtosis: the moment ratios g₁ = m₃/m₂^{3/2}, g₂ = m₄/m₂² − 3 (mᵣ the
 * central moments with divisor n), and the adjusted estimators
 *   G₁ = g₁ sqrt(n(n − 1)) / (n − 2),  G₂ = ((n + 1) g₂ + 6)(n − 1) / ((n − 2)(n − 3))
 * (Joanes & Gill 1998, "Comparing measures of sample skewness and kurtosis", The Statistician 47).
 *
 * Probability-plot points: (Φ⁻¹(pᵢ), x₍ᵢ₎) with Blom's positions pᵢ = (i − 3/8)/(n + 1/4)
 * (Blom 1958), thinned to at most `maxPoints` evenly spaced order statistics for large n.
 */
import { normCdf, normQuantile, normSf } from '../distributions/index';
import { normalUpperBulk } from '../distributions/normal';
import { MethodInputError } from './errors';
import { centralPowerSums, type Sample } from './summary';

const SMALL = 1e-19;

function poly(cc: readonly number[], x: number): number {
  let result = cc[0];
  const nord = cc.length;
  if (nord > 1) {
    let p = x * cc[nord - 1];
    for (let j = nord - 2; j > 0; j--) p = (p + cc[j]) * x;
    result += p;
  }
  return result;
}

const G = [-2.273, 0.459];
const C1 = [0, 0.221157, -0.147981, -2.07119, 4.434685, -2.706056];
const C2 = [0, 0.042981, -0.293762, -1.752461, 5.682633, -3.582633];
const C3 = [0.544, -0.39978, 0.025054, -6.714e-4];
const C4 = [1.3822, -0.77857, 0.062767, -0.0020322];
const C5 = [-1.5861, -0.31082, -0.083751, 0.0038915];
const C6 = [-0.4803, -0.082676, 0.0030302];

export interface ShapiroWilk {
  statistic: number;
  pValue: number;
  n: number;
}

/** Shapiro-Wilk test of sorted data (3 ≤ n ≤ 5000). */
export function shapiroWilk(sortedInput: Float64Array): ShapiroWilk {
  const n = sortedInput.length;
  if (n < 3 || n > 5000) {
    throw new MethodInputError('insufficient-data', 'values', `Shapiro-Wilk applies to 3 ≤ n ≤ 5000 (got n = ${n})`);
  }
  let x = sortedInput;
  let range = x[n - 1] - x[0];
  if (range === 0) throw new MethodInputError('zero-variance', 'values', 'all values are identical; Shapiro-Wilk is not defined');
  if (range < 1e-10) {
    // as R: rescale tiny ranges before the algorithm's range check
    x = x.map((v) => v / range);
    range = x[n - 1] - x[0];
  }
  const nn2 = Math.floor(n / 2);
  const a = new Float64Array(nn2 + 1); // 1-based
  const an = n;
  if (n === 3) {
    a[1] = Math.SQRT1_2;
  } else {
    const an25 = an + 0.25;
    let summ2 = 0;
    for (let i = 1; i <= nn2; i++) {
      a[i] = normQuantile((i - 0.375) / an25);
      summ2 += a[i] * a[i];
    }
    summ2 *= 2;
    const ssumm2 = Math.sqrt(summ2);
    const rsn = 1 / Math.sqrt(an);
    const a1 = poly(C1, rsn) - a[1] / ssumm2;
    let i1: number;
    let fac: number;
    if (n > 5) {
      i1 = 3;
      const a2 = -a[2] / ssumm2 + poly(C2, rsn);
      fac = Math.sqrt((summ2 - 2 * (a[1] * a[1]) - 2 * (a[2] * a[2])) / (1 - 2 * (a1 * a1) - 2 * (a2 * a2)));
      a[2] = a2;
    } else {
      i1 = 2;
      fac = Math.sqrt((summ2 - 2 * (a[1] * a[1])) / (1 - 2 * (a1 * a1)));
    }
    a[1] = a1;
    for (let i = i1; i <= nn2; i++) a[i] /= -fac;
  }
  if (range < SMALL) throw new MethodInputError('zero-variance', 'values', 'the range of the values is too small for Shapiro-Wilk');
  // Sum of the signed coefficients in the same order as AS R94.
  let xx = x[0] / range;
  let sx = xx;
  let sa = -a[1];
  for (let i = 1, j = n - 1; i < n; j--) {
    const xi = x[i] / range;
    sx += xi;
    i++;
    if (i !== j) sa += Math.sign(i - j) * a[Math.min(i, j)];
    xx = xi;
  }
  void xx;
  sa /= n;
  sx /= n;
  let ssa = 0;
  let ssx = 0;
  let sax = 0;
  for (let i = 0, j = n - 1; i < n; i++, j--) {
    const asa = i !== j ? Math.sign(i - j) * a[1 + Math.min(i, j)] - sa : -sa;
    const xsx = x[i] / range - sx;
    ssa += asa * asa;
    ssx += xsx * xsx;
    sax += asa * xsx;
  }
  const ssassx = Math.sqrt(ssa * ssx);
  const w1 = ((ssassx - sax) * (ssassx + sax)) / (ssa * ssx);
  const w = 1 - w1;
  if (n === 3) {
    const pi6 = 1.90985931710274;
    const stqr = 1.0471975511966;
    let pw = pi6 * (Math.asin(Math.sqrt(w)) - stqr);
    if (pw < 0) pw = 0;
    return { statistic: w, pValue: pw, n };
  }
  let y = Math.log(w1);
  const lxx = Math.log(an);
  let m: number;
  let s: number;
  if (n <= 11) {
    const gamma = poly(G, an);
    if (y >= gamma) return { statistic: w, pValue: 1e-99, n };
    y = -Math.log(gamma - y);
    m = poly(C3, an);
    s = Math.exp(poly(C4, an));
  } else {
    m = poly(C5, lxx);
    s = Math.exp(poly(C6, lxx));
  }
  return { statistic: w, pValue: normSf((y - m) / s), n };
}

/** ln Φ(z), accurate in both tails. */
export function logNormCdf(z: number): number {
  if (z > 0) return Math.log1p(-normSf(z));
  if (z > -37) return Math.log(normCdf(z));
  // Asymptotic series of Mills' ratio for the far lower tail.
  const z2 = z * z;
  return -0.5 * z2 - Math.log(-z) - 0.5 * Math.log(2 * Math.PI) + Math.log1p(-1 / z2 + 3 / (z2 * z2) - 15 / (z2 * z2 * z2));
}

export interface AndersonDarling {
  statistic: number;
  adjusted: number;
  pValue: number;
  n: number;
}

/** Anderson-Darling test of sorted data with estimated mean and sd (n ≥ 8). */
export function andersonDarling(sorted: Float64Array, mean: number, sd: number): AndersonDarling {
  const n = sorted.length;
  if (n < 8) throw new MethodInputError('insufficient-data', 'values', `Anderson-Darling needs n ≥ 8 (got n = ${n})`);
  if (!(sd > 0)) throw new MethodInputError('zero-variance', 'values', 'all values are identical; Anderson-Darling is not defined');
  // S = Σ (2i − 1) ln[Φ(z_i) (1 − Φ(z_{n+1−i}))] (1-based). Elements i and j = n + 1 − i are taken
  // in pairs: one tail evaluation t = Φ(−|z|) per element gives both Φ(z) and 1 − Φ(z) (the larger
  // of the two as 1 − t), and one logarithm per term; no scratch array. Where a product would
  // come near underflow (|z| beyond about 26) the logs are taken separately (logNormCdf). The
  // tails come from normalUpperBulk (one exponential instead of two; relative error ≤ about
  // (z²/4 + 4)·eps, far below the cancellation in −n − S/n that bounds A²'s accuracy anyway).
  let s = 0;
  let c = 0;
  for (let i = 0, j = n - 1; i <= j; i++, j--) {
    const zi = (sorted[i] - mean) / sd;
    const zj = (sorted[j] - mean) / sd;
    const ti = normalUpperBulk(Math.abs(zi));
    const tj = i === j ? ti : normalUpperBulk(Math.abs(zj));
    const cdfI = zi <= 0 ? ti : 1 - ti;
    const sfI = zi <= 0 ? 1 - ti : ti;
    const cdfJ = zj <= 0 ? tj : 1 - tj;
    const sfJ = zj <= 0 ? 1 - tj : tj;
    const p1 = cdfI * sfJ;
    let term = (2 * i + 1) * (p1 > 1e-280 ? Math.log(p1) : logNormCdf(zi) + logNormCdf(-zj));
    let t = s + term;
    c += Math.abs(s) >= Math.abs(term) ? s - t + term : term - t + s;
    s = t;
    if (i === j) break;
    const p2 = cdfJ * sfI;
    term = (2 * j + 1) * (p2 > 1e-280 ? Math.log(p2) : logNormCdf(zj) + logNormCdf(-zi));
    t = s + term;
    c += Math.abs(s) >= Math.abs(term) ? s - t + term : term - t + s;
    s = t;
  }
  const statistic = -n - (s + c) / n;
  const adjusted = statistic * (1 + 0.75 / n + 2.25 / (n * n));
  return { statistic, adjusted, pValue: andersonDarlingPValue(adjusted), n };
}

/** D'Agostino & Stephens (1986) p-value of the adjusted statistic A* (normal, both parameters estimated). */
export function andersonDarlingPValue(aa: number): number {
  if (aa < 0.2) return 1 - Math.exp(-13.436 + 101.14 * aa - 223.73 * aa * aa);
  if (aa < 0.34) return 1 - Math.exp(-8.318 + 42.796 * aa - 59.938 * aa * aa);
  if (aa < 0.6) return Math.exp(0.9177 - 4.279 * aa - 1.38 * aa * aa);
  if (aa < 10) return Math.exp(1.2937 - 5.709 * aa + 0.0186 * aa * aa);
  return 3.7e-24;
}

export interface ShapeMoments {
  /** g₁ = m₃ / m₂^{3/2}. */
  skewness: number;
  /** g₂ = m₄ / m₂² − 3. */
  excessKurtosis: number;
  /** G₁ (n ≥ 3), else null. */
  adjustedSkewness: number | null;
  /** G₂ (n ≥ 4), else null. */
  adjustedExcessKurtosis: number | null;
}

export function shapeMoments(sample: Sample): ShapeMoments {
  const n = sample.n;
  const { s2, s3, s4 } = centralPowerSums(sample.values, sample.moments.mean);
  if (!(s2 > 0)) throw new MethodInputError('zero-variance', 'values', 'all values are identical; skewness and kurtosis are not defined');
  const m2 = s2 / n;
  const m3 = s3 / n;
  const m4 = s4 / n;
  const g1 = m3 / Math.pow(m2, 1.5);
  const g2 = m4 / (m2 * m2) - 3;
  return {
    skewness: g1,
    excessKurtosis: g2,
    adjustedSkewness: n >= 3 ? (g1 * Math.sqrt(n * (n - 1))) / (n - 2) : null,
    adjustedExcessKurtosis: n >= 4 ? (((n + 1) * g2 + 6) * (n - 1)) / ((n - 2) * (n - 3)) : null,
  };
}

export interface PlotPoint {
  rank: number;
  theoretical: number;
  observed: number;
}

export function probabilityPlotPoints(sorted: Float64Array, maxPoints = 500): PlotPoint[] {
  const n = sorted.length;
  const points: PlotPoint[] = [];
  const count = Math.min(n, maxPoints);
  for (let k = 0; k < count; k++) {
    const i = count === n ? k + 1 : Math.round(1 + (k * (n - 1)) / (count - 1));
    points.push({ rank: i, theoretical: normQuantile((i - 0.375) / (n + 0.25)), observed: sorted[i - 1] });
  }
  return points;
}
