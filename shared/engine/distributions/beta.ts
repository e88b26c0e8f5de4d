/**
 * The regularized incomplete beta function I_x(a, b) and its complement, each computed directly,
 * with x and y = 1 − x passed separately so that neither loses the precision of the other.
 *
 * Source: A. R. DiDonato & A. H. Morris (1992), "Algorithm 708: Significant digit computation of
 * the incomplete beta function ratios", ACM TOMS 18, 360–373 — its continued fraction BFRAC
 * (an even contraction of the continued fraction of A&S 26.5.8, written with
 * λ = (a + b)y − b = a − (a + b)x formed from the smaller of x and y), used in the orientation in
 * which it converges (x ≤ a/(a + b), else the symmetry I_x(a, b) = 1 − I_y(b, a)). The factor
 * x^a y^b / B(a, b) comes from Loader's binomial saddle-point form (special.ts) for a, b ≥ 1.
 */
import { logBetaTerm } from './special';

const EPS = Number.EPSILON;

/** BFRAC: I_x(a, b) = exp(logFront) · r for λ = a − (a + b)x ≥ 0; returns log I. */
function logBfrac(a: number, b: number, x: number, y: number, lambda: number): number {
  const logFront = logBetaTerm(x, y, a, b, lambda);
  if (logFront === -Infinity) return -Infinity;
  const c = lambda + 1;
  const c0 = b / a;
  const c1 = 1 / a + 1;
  const yp1 = y + 1;
  let n = 0;
  let p = 1;
  let s = a + 1;
  let an = 0;
  let bn = 1;
  let anp1 = 1;
  let bnp1 = c / c1;
  let r = c1 / c;
  for (let iter = 0; iter < 100000; iter++) {
    n += 1;
    let t = n / a;
    const w = n * (b - n) * x;
    let e = a / s;
    const alpha = p * (p + c0) * e * e * (w * x);
    e = (t + 1) / (c1 + t + t);
    const beta = n + w / s + e * (c + n * yp1);
    p = t + 1;
    s += 2;
    t = alpha * an + beta * anp1;
    an = anp1;
    anp1 = t;
    t = alpha * bn + beta * bnp1;
    bn = bnp1;
    bnp1 = t;
    const r0 = r;
    r = anp1 / bnp1;
    if (Math.abs(r - r0) <= EPS * r) break;
    an /= bnp1;
    bn /= bnp1;
    anp1 = r;
    bnp1 = 1;
  }
  return logFront + Math.log(r);
}

export interface BetaTails {
  lower: number;
  upper: number;
}

/**
 * log I_x(a, b) and log(1 − I_x(a, b)) for a, b > 0, 0 ≤ x ≤ 1, y = 1 − x (given with its own
 * precision). The smaller tail comes from the continued fraction, the other as log1p(−small).
 * `lambdaIn`, when given, is λ = a − (a + b)x computed by the caller without the rounding of x.
 */
export function logRegularizedBeta(x: number, y: number, a: number, b: number, lambdaIn?: number): BetaTails {
  if (x <= 0) return { lower: -Infinity, upper: 0 };
  if (y <= 0) return { lower: 0, upper: -Infinity };
  // λ = a − (a + b)x, formed from the smaller of x and y unless the caller has it more precisely
  const lambda = lambdaIn ?? (x < y ? a - (a + b) * x : (a + b) * y - b);
  if (lambda >= 0) {
    const lower = logBfrac(a, b, x, y, lambda);
    return { lower, upper: log1mexp(lower) };
  }
  const upper = logBfrac(b, a, y, x, -lambda);
  return { lower: log1mexp(upper), upper };
}

/** log(1 − e^u) for u ≤ 0 (Mächler 2012, "Accurately computing log(1 − exp(−|a|))"). */
export function log1mexp(u: number): number {
  return u > -Math.LN2 ? Math.log(-Math.expm1(u)) : Math.log1p(-Math.exp(u));
}

export function regularizedBeta(x: number, y: number, a: number, b: number, lambda?: number): BetaTails {
  const t = logRegularizedBeta(x, y, a, b, lambda);
  return { lower: Math.exp(t.lower), upper: Math.exp(t.upper) };
}
