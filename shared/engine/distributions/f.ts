/**
 * The F distribution through the regularized incomplete beta function:
 * P(F ≤ x) = I_z(d1/2, d2/2) with z = d1 x/(d1 x + d2), P(F > x) = I_{1−z}(d2/2, d1/2)
 * (Abramowitz & Stegun 26.6.2), each tail computed directly. 1 − z = d2/(d1 x + d2) and
 * λ = a − (a + b)z = d1 d2 (1 − x)/(2(d1 x + d2)) are formed from x itself, not from z, because at
 * large degrees of freedom the tail probabilities are so sensitive to x that the rounding of z
 * alone would cost thousands of ulp (condition number ≈ 2e4 at df = (1e7, 1e7)).
 * Quantiles: Newton on the log tail in log x (solve.ts), started from Paulson's (1942) cube-root
 * normal approximation or the small-tail asymptote I_z(a, b) ≈ z^a/(a B(a, b)).
 */
import { logRegularizedBeta, type BetaTails } from './beta';
import { normalUpperQuantile } from './normal';
import { logBeta, logBetaTerm } from './special';
import { solveTail } from './solve';

interface FArgs {
  z: number;
  y: number;
  lambda: number;
}

function fArgs(x: number, d1: number, d2: number): FArgs {
  const a = d1 / 2;
  const b = d2 / 2;
  const w = d1 * x + d2;
  if (Number.isFinite(w)) {
    return { z: (d1 * x) / w, y: d2 / w, lambda: (d1 * d2 * (1 - x)) / (2 * w) };
  }
  const r = d2 / d1 / x;
  const z = 1 / (1 + r);
  const y = r / (1 + r);
  return { z, y, lambda: a * y - b * z };
}

/** log P(F ≤ x) and log P(F > x) for x > 0 (finite). */
export function fLogTails(x: number, d1: number, d2: number): BetaTails {
  const { z, y, lambda } = fArgs(x, d1, d2);
  return logRegularizedBeta(z, y, d1 / 2, d2 / 2, lambda);
}

/** log density at x > 0: f(x) = z^a (1 − z)^b / (B(a, b) x). */
export function fLogDensity(x: number, d1: number, d2: number): number {
  const { z, y, lambda } = fArgs(x, d1, d2);
  return logBetaTerm(z, y, d1 / 2, d2 / 2, lambda) - Math.log(x);
}

function fStart(p: number, d1: number, d2: number, lower: boolean): number {
  const a = d1 / 2;
  const b = d2 / 2;
  const zq = normalUpperQuantile(p) * (lower ? -1 : 1);
  const c1 = 2 / (9 * d1);
  const c2 = 2 / (9 * d2);
  const A = 1 - c2;
  const B = 1 - c1;
  // (A u − B)² = z² (c2 u² + c1), u = x^(1/3), root on the side of the sign of z
  const qa = A * A - zq * zq * c2;
  const qb = -2 * A * B;
  const qc = B * B - zq * zq * c1;
  const disc = qb * qb - 4 * qa * qc;
  let paulson = NaN;
  if (qa > 0 && disc >= 0) {
    const u = zq >= 0 ? (-qb + Math.sqrt(disc)) / (2 * qa) : (-qb - Math.sqrt(disc)) / (2 * qa);
    if (u > 0) paulson = u * u * u;
  }
  const lb = logBeta(a, b);
  if (lower) {
    const zs = Math.exp((Math.log(p) + Math.log(a) + lb) / a);
    const asym = (d2 / d1) * (zs / (1 - Math.min(zs, 0.5)));
    if (!(paulson > 0) || asym < paulson) return asym > 0 ? asym : Number.MIN_VALUE;
    return paulson;
  }
  const ys = Math.exp((Math.log(p) + Math.log(b) + lb) / b);
  const asym = (d2 / d1) / ys;
  if (!(paulson > 0) || asym > paulson) return Number.isFinite(asym) ? asym : Number.MAX_VALUE;
  return paulson;
}

/** x with P(F ≤ x) = p (lower) or P(F > x) = p (upper), 0 < p ≤ ½. */
export function fSolve(p: number, d1: number, d2: number, lower: boolean): number {
  // Far tails: I_z(a, b) = z^a/(a B(a, b)) (1 + O(z)), so the asymptote is exact where the quantile
  // is below 1e-280 (0 where it underflows) or above 1e280 (Infinity where it overflows).
  const a = d1 / 2;
  const b = d2 / 2;
  const lb = logBeta(a, b);
  if (lower) {
    const zs = Math.exp((Math.log(p) + Math.log(a) + lb) / a);
    if (zs < 1e-280) return (d2 / d1) * zs;
  } else {
    const ys = Math.exp((Math.log(p) + Math.log(b) + lb) / b);
    if (ys < 1e-280) return d2 / d1 / ys;
  }
  return solveTail(
    (x) => {
      const t = fLogTails(x, d1, d2);
      return { logTail: lower ? t.lower : t.upper, logDensity: fLogDensity(x, d1, d2) };
    },
    p,
    lower,
    fStart(p, d1, d2, lower),
  );
}
