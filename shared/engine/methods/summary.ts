/**
 * Spread summary of one sample: n, mean, variance (divisor n − 1), sd, CV, min, max, median,
 * quartiles, and the central moment sums used by the other methods.
 *
 * Variance. Two routes, both exact to a few roundings:
 * 1. Decimal data (every value round-trips through at most 9 decimal places, |x·10^k| < 2^53):
 *    the values are taken as the decimals they print as, scaled to integers X = x·10^k and shifted
 *    by the first, D = X − X₀; ΣD and ΣD² are then exact in binary64 (checked: ΣD² ≤ 2^53), and
 *    s² = (n·ΣD² − (ΣD)²) / (n(n − 1)·10^{2k}) is formed in exact integer (BigInt) arithmetic and
 *    rounded once. This reproduces the certified values of NIST StRD NumAcc1–4 to within 1–2 ulp,
 *    which no floating-point algorithm can do on NumAcc4 because 10000000.1 has no exact binary
 *    form (a plain two-pass algorithm gives sd 0.100000000558794 there).
 * 2. Otherwise the corrected two-pass algorithm (Chan, Golub & LeVeque 1983, "Algorithms for
 *    computing the sample variance", The American Statistician 37(3)) with Neumaier-compensated
 *    sums: m₀ = Σx/n, d = x − m₀, x̄ = m₀ + Σd/n, SS = Σd² − (Σd)²/n.
 *
 * Quartiles and median: R's default quantile (Hyndman & Fan 1996 type 7),
 * Q(p) = x₍ⱼ₎ + γ(x₍ⱼ₊₁₎ − x₍ⱼ₎), h = (n − 1)p, j = ⌊h⌋, γ = h − j (0-based order statistics).
 *
 * Example: NumAcc1 {10000001, 10000003, 10000002} → mean 10000002, sd 1 (certified).
 */
import { sortFloat64 } from '../sort';
import { MethodInputError } from './errors';

const TWO53 = 9007199254740992;

export interface Moments {
  n: number;
  mean: number;
  variance: number;
  sd: number;
  /** Σ(x − x̄)², consistent with `variance`·(n − 1). */
  sumSquares: number;
  min: number;
  max: number;
  /** How the variance was computed. */
  route: 'decimal-exact' | 'compensated-two-pass';
}

/** A validated sample: finite values, with its moments and a lazily sorted copy. */
export class Sample {
  readonly values: Float64Array;
  readonly moments: Moments;
  private sortedValues: Float64Array | null = null;

  private constructor(values: Float64Array, moments: Moments, sorted: Float64Array | null) {
    this.values = values;
    this.moments = moments;
    this.sortedValues = sorted;
  }

  /**
   * Validates `values` (all finite, at least `minN` of them) and computes the moments; the values
   * are not copied (a Float64Array is used as it is and must not be changed afterwards).
   * Throws MethodInputError 'non-finite' naming the first bad position, or 'insufficient-data'.
   */
  static of(values: Float64Array | readonly number[], minN = 1, sorted?: Float64Array): Sample {
    const data = values instanceof Float64Array ? values : Float64Array.from(values);
    if (data.length < minN) {
      throw new MethodInputError('insufficient-data', 'values', `needs at least ${minN} values (got ${data.length})`);
    }
    // computeMoments reports non-finite values (its first pass sees them as a non-finite sum), so
    // the data are read once less.
    return new Sample(data, computeMoments(data), sorted ?? null);
  }

  get n(): number {
    return this.values.length;
  }

  /** Ascending copy of the values (radix sort, computed once). */
  sorted(): Float64Array {
    if (this.sortedValues === null) this.sortedValues = sortFloat64(this.values);
    return this.sortedValues;
  }
}

export function computeMoments(x: Float64Array): Moments {
  const n = x.length;
  if (n === 0) return { n, mean: NaN, variance: NaN, sd: NaN, sumSquares: NaN, min: NaN, max: NaN, route: 'compensated-two-pass' };
  const exact = decimalExactMoments(x);
  if (exact) return exact;
  // Pass 1: compensated sum, min, max.
  let s = 0;
  let c = 0;
  let min = x[0];
  let max = x[0];
  for (let i = 0; i < n; i++) {
    const v = x[i];
    const t = s + v;
    if (Math.abs(s) >= Math.abs(v)) c += s - t + v;
    else c += v - t + s;
    s = t;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  if (!Number.isFinite(s + c)) {
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(x[i])) {
        throw new MethodInputError('non-finite', 'values', `value ${i + 1} is ${x[i]}; every value must be a finite number`);
      }
    }
    throw new MethodInputError('non-finite', 'values', 'the values are too large: their sum overflows the floating-point range');
  }
  const m0 = (s + c) / n;
  // Pass 2: compensated Σd and Σd² about m0.
  let sd1 = 0;
  let cd1 = 0;
  let sd2 = 0;
  let cd2 = 0;
  for (let i = 0; i < n; i++) {
    const d = x[i] - m0;
    let t = sd1 + d;
    if (Math.abs(sd1) >= Math.abs(d)) cd1 += sd1 - t + d;
    else cd1 += d - t + sd1;
    sd1 = t;
    const d2 = d * d;
    t = sd2 + d2;
    if (sd2 >= d2) cd2 += sd2 - t + d2;
    else cd2 += d2 - t + sd2;
    sd2 = t;
  }
  const sumD = sd1 + cd1;
  const sumSquares = Math.max(0, sd2 + cd2 - (sumD * sumD) / n);
  const mean = m0 + sumD / n;
  const variance = n > 1 ? sumSquares / (n - 1) : NaN;
  return { n, mean, variance, sd: Math.sqrt(variance), sumSquares, min, max, route: 'compensated-two-pass' };
}

/** The decimal-exact route (see the module comment), or null when the data are not short decimals. */
function decimalExactMoments(x: Float64Array): Moments | null {
  const n = x.length;
  let k = 0;
  let p = 1;
  for (let i = 0; i < n; i++) {
    const v = x[i];
    while (Math.round(v * p) / p !== v) {
      if (++k > 9) return null;
      p *= 10;
    }
    if (Math.abs(v * p) >= TWO53) return null;
  }
  const x0 = Math.round(x[0] * p);
  let sumD = 0;
  let sumD2 = 0;
  let min = x[0];
  let max = x[0];
  for (let i = 0; i < n; i++) {
    const v = x[i];
    const d = Math.round(v * p) - x0;
    sumD += d;
    sumD2 += d * d;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  // All terms are integers; every partial sum of squares is ≤ the total, so ≤ 2^53 means exact
  // (and Σ|D| ≤ ΣD² bounds the first sum too).
  if (!(sumD2 <= TWO53)) return null;
  const bn = BigInt(n);
  const bp = BigInt(p);
  const meanNumerator = BigInt(x0) * bn + BigInt(sumD);
  const mean = ratioToNumber(meanNumerator, bn * bp);
  const ssTimesN = bn * BigInt(sumD2) - BigInt(sumD) * BigInt(sumD);
  const sumSquares = ratioToNumber(ssTimesN, bn * bp * bp);
  const variance = n > 1 ? ratioToNumber(ssTimesN, bn * BigInt(n - 1) * bp * bp) : NaN;
  return { n, mean, variance, sd: Math.sqrt(variance), sumSquares, min, max, route: 'decimal-exact' };
}

/** num/den for big integers, rounded to binary64 with at most about one ulp of error. */
function ratioToNumber(num: bigint, den: bigint): number {
  if (num === 0n) return 0;
  const negative = num < 0n !== den < 0n;
  let a = num < 0n ? -num : num;
  const b = den < 0n ? -den : den;
  // Scale so the integer quotient has 64+ bits, then one division in binary64.
  const shift = Math.max(0, 64 - (a.toString(2).length - b.toString(2).length));
  a <<= BigInt(shift);
  const q = a / b;
  const r = a % b;
  // Sticky bit for the remainder keeps the final rounding honest.
  const qq = r === 0n ? q : q | 1n;
  const value = Number(qq) / 2 ** shift;
  return negative ? -value : value;
}

/** Quantile of sorted data, R type 7. */
export function quantileSorted(sorted: Float64Array, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * p;
  const j = Math.floor(h);
  const g = h - j;
  if (j + 1 >= n) return sorted[n - 1];
  return g === 0 ? sorted[j] : sorted[j] + g * (sorted[j + 1] - sorted[j]);
}

export interface SpreadSummary {
  n: number;
  mean: number;
  variance: number;
  sd: number;
  /** sd / |mean|; not available when the mean is 0. */
  cv: number | null;
  min: number;
  max: number;
  range: number;
  median: number;
  q1: number;
  q3: number;
  iqr: number;
  route: Moments['route'];
}

/** The spread summary of a sample with n ≥ 2. */
export function spreadSummary(sample: Sample): SpreadSummary {
  const m = sample.moments;
  if (m.n < 2) throw new MethodInputError('insufficient-data', 'values', `needs at least 2 values (got ${m.n})`);
  const sorted = sample.sorted();
  const q1 = quantileSorted(sorted, 0.25);
  const q3 = quantileSorted(sorted, 0.75);
  return {
    n: m.n,
    mean: m.mean,
    variance: m.variance,
    sd: m.sd,
    cv: m.mean !== 0 ? m.sd / Math.abs(m.mean) : null,
    min: m.min,
    max: m.max,
    range: m.max - m.min,
    median: quantileSorted(sorted, 0.5),
    q1,
    q3,
    iqr: q3 - q1,
    route: m.route,
  };
}

/** Σ(x − c)^4 (compensated): the one power sum Bonett's interval needs, in a lean loop. */
export function fourthPowerSum(x: Float64Array, c: number): number {
  let s = 0;
  let comp = 0;
  for (let i = 0; i < x.length; i++) {
    const d = x[i] - c;
    const d2 = d * d;
    const d4 = d2 * d2;
    const t = s + d4;
    comp += s >= d4 ? s - t + d4 : d4 - t + s;
    s = t;
  }
  return s + comp;
}

/**
 * Σ(x − c)^3 and Σ(x − c)^4 about c (compensated), for skewness, kurtosis and Bonett's interval.
 */
export function centralPowerSums(x: Float64Array, c: number): { s2: number; s3: number; s4: number } {
  let s2 = 0;
  let c2 = 0;
  let s3 = 0;
  let c3 = 0;
  let s4 = 0;
  let c4 = 0;
  for (let i = 0; i < x.length; i++) {
    const d = x[i] - c;
    const d2 = d * d;
    const d3 = d2 * d;
    const d4 = d2 * d2;
    let t = s2 + d2;
    c2 += s2 >= d2 ? s2 - t + d2 : d2 - t + s2;
    s2 = t;
    t = s3 + d3;
    c3 += Math.abs(s3) >= Math.abs(d3) ? s3 - t + d3 : d3 - t + s3;
    s3 = t;
    t = s4 + d4;
    c4 += s4 >= d4 ? s4 - t + d4 : d4 - t + s4;
    s4 = t;
  }
  return { s2: s2 + c2, s3: s3 + c3, s4: s4 + c4 };
}
