/**
 * Regularized incomplete gamma functions P(a, x) and Q(a, x) = 1 − P(a, x), each computed directly
 * (never as one minus the other where that would cancel), and the chi-square distribution.
 *
 * Sources:
 * - Abramowitz & Stegun (1964) 6.5.29 (series) and 6.5.31 (Legendre's continued fraction),
 *   the continued fraction evaluated by the modified Lentz method (W. J. Lentz 1976, Applied
 *   Optics 15, 668; I. J. Thompson & A. R. Barnett 1986, J. Comput. Phys. 64, 490).
 * - N. M. Temme (1979), "The asymptotic expansion of the incomplete gamma functions", SIAM J. Math.
 *   Anal. 10, 757–766, and DiDonato & Morris (1986), ACM TOMS 12, 377–393, for the choice of method
 *   by region (series below the transition x ≈ a, continued fraction above it).
 * - The factor x^a e^(−x) / Γ(a + 1) in front of both comes from Loader's saddle-point form
 *   (see special.ts), so it keeps full relative accuracy for a up to 1e7 and beyond.
 */
import { logPoissonTerm, poissonTerm } from './special';

const EPS = Number.EPSILON;

/** Σ_{k≥0} x^k / ((a+1)(a+2)⋯(a+k)), so that P(a, x) = D(a, x) · sum. */
function lowerSeries(a: number, x: number): number {
  let term = 1;
  let sum = 1;
  let c = 0; // Kahan compensation
  for (let k = 1; k < 1e6; k++) {
    term *= x / (a + k);
    const y = term - c;
    const t = sum + y;
    c = t - sum - y;
    sum = t;
    if (term <= sum * EPS * 0.25) break;
  }
  return sum;
}

/**
 * Legendre's continued fraction: Q(a, x) = D(a, x) · (a/x) · x/(x + 1 − a − 1(1 − a)/(x + 3 − a − ⋯)),
 * returned as the factor a · CF with CF = 1/(x + 1 − a − 1·(1 − a)/(x + 3 − a − 2·(2 − a)/…)).
 */
function upperContinuedFraction(a: number, x: number): number {
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 1e6; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) <= EPS) break;
  }
  return a * h;
}

export interface GammaTails {
  /** P(a, x), the lower regularized incomplete gamma function */
  lower: number;
  /** Q(a, x), the upper one */
  upper: number;
}

/** Both tails of the regularized incomplete gamma function, for a > 0 and x ≥ 0. */
export function regularizedGamma(a: number, x: number): GammaTails {
  if (x <= 0) return { lower: 0, upper: 1 };
  if (x === Infinity) return { lower: 1, upper: 0 };
  const useSeries = x < a + 1 || (x < 2 && a < 1);
  const logD = logPoissonTerm(a, x);
  if (useSeries) {
    const lower = Math.exp(logD + Math.log(lowerSeries(a, x)));
    return { lower, upper: 1 - lower };
  }
  const upper = Math.exp(logD + Math.log(upperContinuedFraction(a, x)));
  return { lower: 1 - upper, upper };
}

/** log P(a, x) and log Q(a, x) for the quantile search (finite where the tail underflows). */
export function logRegularizedGamma(a: number, x: number): { lower: number; upper: number } {
  if (x <= 0) return { lower: -Infinity, upper: 0 };
  const useSeries = x < a + 1 || (x < 2 && a < 1);
  const logD = logPoissonTerm(a, x);
  if (useSeries) {
    const ll = logD + Math.log(lowerSeries(a, x));
    return { lower: ll, upper: Math.log1p(-Math.exp(ll)) };
  }
  const lu = logD + Math.log(upperContinuedFraction(a, x));
  return { lower: Math.log1p(-Math.exp(lu)), upper: lu };
}

export { poissonTerm };

// ---- chi-square ---------------------------------------------------------------------------------
import { normalUpperQuantile } from './normal';
import { lgamma } from './special';
import { solveTail, type TailAndDensity } from './solve';

/** log density of chi-square(df) at x > 0: log D(a, x/2) + log(a/x), a = df/2 */
export function chisqLogDensity(x: number, df: number): number {
  const a = df / 2;
  return logPoissonTerm(a, x / 2) + Math.log(a / x);
}

/** Starting value: Wilson & Hilferty (1931) cube-root normal approximation, with the small-x
 * asymptote P(a, y) ≈ y^a / Γ(a + 1) for lower tails it cannot reach. */
function chisqStart(prob: number, df: number, lower: boolean): number {
  const zUpper = normalUpperQuantile(Math.min(prob, 0.5)) * (lower ? -1 : 1);
  const c = 2 / (9 * df);
  const wh = df * Math.pow(1 - c + zUpper * Math.sqrt(c), 3);
  if (lower) {
    const small = 2 * Math.exp((Math.log(prob) + lgamma(df / 2 + 1)) / (df / 2));
    if (!(wh > 0) || small < wh) return small;
  }
  return wh > 0 ? wh : df;
}

/** x with P(X ≤ x) = p (lower = true) or P(X > x) = p (lower = false), for 0 < p ≤ ½. */
export function chisqSolve(p: number, df: number, lower: boolean): number {
  const a = df / 2;
  const evaluate = (x: number): TailAndDensity => {
    const t = logRegularizedGamma(a, x / 2);
    return { logTail: lower ? t.lower : t.upper, logDensity: chisqLogDensity(x, df) };
  };
  if (lower) {
    // Far in the lower tail P(a, y) = y^a/Γ(a + 1) · (1 + O(y)), so the asymptote is exact there
    // (and is 0 where the quantile underflows, as for df = 1, p = 1e-300).
    const small = 2 * Math.exp((Math.log(p) + lgamma(a + 1)) / a);
    if (small < 1e-280) return small;
  }
  return solveTail(evaluate, p, lower, chisqStart(p, df, lower));
}
