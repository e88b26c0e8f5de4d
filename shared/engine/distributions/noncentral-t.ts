/**
 * The noncentral t distribution with ν degrees of freedom and noncentrality δ.
 *
 * Sources:
 * - The Poisson-mixture form (Guenther 1978, J. Statist. Comput. Simul. 6, 199–206; Lenth 1989,
 *   Algorithm AS 243, Applied Statistics 38, 185–189): for x ≥ 0, with z = x²/(x² + ν), λ = δ²/2,
 *   P(T ≤ x) = Φ(−δ) + ½ Σ_{j≥0} [p_j I_z(j + ½, ν/2) + q_j I_z(j + 1, ν/2)],
 *   p_j = e^(−λ) λ^j / j!, q_j = δ e^(−λ) λ^j / (√2 Γ(j + 3/2)) = sign(δ) e^(−λ) λ^(j+½) / Γ(j + 3/2),
 *   and P(T > x) = ½ Σ [p_j I_{1−z}(ν/2, j + ½) + q_j I_{1−z}(ν/2, j + 1)] directly (no 1 − F).
 *   Unlike AS 243, which sums upward from j = 0 with a fixed error bound of 1e-12, the sum here
 *   runs outward from the Poisson mode in both directions until the remaining terms are below
 *   1e-17 of the sum, every weight comes from Loader's saddle-point Poisson form (special.ts) and
 *   every incomplete beta from beta.ts, so the result keeps relative accuracy in both tails.
 * - Where the mixture would cancel (x ≥ 0 with δ < 0, upper tail; equivalently x < 0 with δ > 0,
 *   lower tail) the probability is the integral over the chi variable s = sqrt(V):
 *   P(T > x) = ∫₀^∞ Φ(δ − x s/√ν) f_χ(s; ν) ds (e.g. Owen 1968, Technometrics 10, 445–478),
 *   integrated by 20-point Gauss-Legendre panels around the mode of the log-concave integrand.
 * - Reflection: P(T ≤ x; ν, δ) = P(T ≥ −x; ν, −δ).
 * - Quantiles: Newton's method with the mixture density, inside a bracket, on the tail whose
 *   probability is at most ½.
 */
import { logRegularizedBeta } from './beta';
import { normalUpper, normalUpperQuantile } from './normal';
import { lgamma, logBetaTerm, poissonTerm } from './special';

const TOL = 1e-17;

/** Σ over half-integer k of sign_k · poissonTerm(k, λ) · term(k), outward from the mode. */
function mixtureSum(lambda: number, deltaSign: number, term: (k: number) => number, boundedByWeight: 'up' | 'down'): number {
  // k runs over 0, ½, 1, 3/2, …; integer k carry p_j (positive), half-integers carry q_j (sign of δ)
  const mode = Math.max(0, Math.floor(2 * lambda) / 2);
  const weight = (k: number): number => (lambda === 0 ? (k === 0 ? 1 : 0) : k === 0 ? Math.exp(-lambda) : poissonTerm(k, lambda));
  const sign = (k: number): number => (Number.isInteger(k) ? 1 : deltaSign);
  let sum = 0;
  // upward from the mode
  for (let k = mode; ; k += 0.5) {
    const w = weight(k);
    const t = w === 0 ? 0 : w * term(k);
    sum += sign(k) * t;
    const small = boundedByWeight === 'up' ? w : t;
    if (k > mode + 5 && Math.abs(small) <= TOL * Math.abs(sum)) break;
    if (w === 0 && k > mode) break;
    if (k > mode + 1e6) break;
  }
  for (let k = mode - 0.5; k >= 0; k -= 0.5) {
    const w = weight(k);
    const t = w === 0 ? 0 : w * term(k);
    sum += sign(k) * t;
    const small = boundedByWeight === 'down' ? w : t;
    if (Math.abs(small) <= TOL * Math.abs(sum) || w === 0) break;
  }
  return sum;
}

// 20-point Gauss-Legendre nodes and weights on [−1, 1] (Newton on P_20, Golub-Welsch-free classic).
const GL_N = 20;
const GL_X: number[] = [];
const GL_W: number[] = [];
for (let i = 1; i <= GL_N; i++) {
  let x = Math.cos((Math.PI * (i - 0.25)) / (GL_N + 0.5));
  let dp = 0;
  for (let it = 0; it < 100; it++) {
    let p0 = 1;
    let p1 = x;
    for (let k = 2; k <= GL_N; k++) {
      const p2 = ((2 * k - 1) * x * p1 - (k - 1) * p0) / k;
      p0 = p1;
      p1 = p2;
    }
    dp = (GL_N * (x * p1 - p0)) / (x * x - 1);
    const dx = p1 / dp;
    x -= dx;
    if (Math.abs(dx) < 1e-17) break;
  }
  GL_X.push(x);
  GL_W.push(2 / ((1 - x * x) * dp * dp));
}

/** log of the chi density f_χ(s; ν) = s^(ν−1) e^(−s²/2) / (2^(ν/2−1) Γ(ν/2)). */
function logChiDensity(s: number, nu: number): number {
  return (nu - 1) * Math.log(s) - 0.5 * s * s - (nu / 2 - 1) * Math.LN2 - lgamma(nu / 2);
}

/** P(T > x) for x ≥ 0, δ < 0 as ∫ Φ̄(x s/√ν − δ) f_χ(s) ds (positive integrand, no cancellation). */
function upperByIntegral(x: number, nu: number, delta: number): number {
  const sq = Math.sqrt(nu);
  const logG = (s: number): number => Math.log(normalUpper((x * s) / sq - delta)) + logChiDensity(s, nu);
  // mode of the log-concave integrand by golden-section search
  let a = 1e-12;
  let b = sq + 60;
  const gr = (Math.sqrt(5) - 1) / 2;
  let c = b - gr * (b - a);
  let d = a + gr * (b - a);
  let fc = logG(c);
  let fd = logG(d);
  for (let i = 0; i < 200 && b - a > 1e-10 * (1 + b); i++) {
    // both underflowed: the integrand dies at large s (normal and chi tails), so shrink from the right
    if (fc > fd || (fc === -Infinity && fd === -Infinity)) {
      b = d;
      d = c;
      fd = fc;
      c = b - gr * (b - a);
      fc = logG(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + gr * (b - a);
      fd = logG(d);
    }
  }
  const m = 0.5 * (a + b);
  const lm = logG(m);
  const h = 1e-4 * Math.max(1, m);
  const second = m > h ? (logG(m + h) - 2 * lm + logG(m - h)) / (h * h) : -1;
  let w = second < 0 ? 1 / Math.sqrt(-second) : 1;
  if (m < 1e-6) {
    // mode at the boundary s = 0 (ν ≤ 1 or a steep normal factor): the scale is the decay rate there
    const hs = 1e-7;
    const slope = (logG(m + hs) - lm) / hs;
    if (slope < 0) w = Math.min(w, 1 / -slope);
  }
  const lo = Math.max(0, m - 40 * w);
  const hi = m + 40 * w;
  const panels = 40;
  const step = (hi - lo) / panels;
  let sum = 0;
  for (let pIdx = 0; pIdx < panels; pIdx++) {
    const mid = lo + (pIdx + 0.5) * step;
    for (let i = 0; i < GL_N; i++) {
      const s = mid + 0.5 * step * GL_X[i];
      if (s <= 0) continue;
      sum += GL_W[i] * Math.exp(logG(s) - lm);
    }
  }
  return 0.5 * step * sum * Math.exp(lm);
}

/** Both tails for x ≥ 0. */
function tailsNonNegative(x: number, nu: number, delta: number): { lower: number; upper: number } {
  if (x === 0) return { lower: normalUpper(delta), upper: normalUpper(-delta) };
  const lambda = 0.5 * delta * delta;
  const sgn = delta < 0 ? -1 : 1;
  if (x === Infinity) return { lower: 1, upper: 0 };
  const x2 = x * x;
  const wq = x2 + nu;
  const z = Number.isFinite(wq) ? x2 / wq : 1;
  const y = Number.isFinite(wq) ? nu / wq : nu / x / x;
  const b = nu / 2;
  const lowerPart = mixtureSum(lambda, sgn, (k) => Math.exp(logRegularizedBeta(z, y, k + 0.5, b).lower), 'down');
  const lower = normalUpper(delta) + 0.5 * lowerPart;
  if (delta >= 0) {
    const upper = 0.5 * mixtureSum(lambda, sgn, (k) => Math.exp(logRegularizedBeta(z, y, k + 0.5, b).upper), 'up');
    return { lower, upper };
  }
  return { lower: Math.min(lower, 1), upper: upperByIntegral(x, nu, delta) };
}

export function nctTails(x: number, nu: number, delta: number): { lower: number; upper: number } {
  if (x >= 0) return tailsNonNegative(x, nu, delta);
  const t = tailsNonNegative(-x, nu, -delta);
  return { lower: t.upper, upper: t.lower };
}

/** Density: for x > 0, f(x) = (1/x) Σ_k sign_k poissonTerm(k, λ) z^(k+½) y^(ν/2) / B(k + ½, ν/2). */
export function nctDensity(x: number, nu: number, delta: number): number {
  if (x < 0) return nctDensity(-x, nu, -delta);
  if (x === Infinity) return 0;
  if (x === 0) {
    return Math.exp(lgamma((nu + 1) / 2) - lgamma(nu / 2) - 0.5 * Math.log(nu * Math.PI) - 0.5 * delta * delta);
  }
  const lambda = 0.5 * delta * delta;
  const x2 = x * x;
  const wq = x2 + nu;
  const z = x2 / wq;
  const y = nu / wq;
  const s = mixtureSum(lambda, delta < 0 ? -1 : 1, (k) => Math.exp(logBetaTerm(z, y, k + 0.5, nu / 2)), 'down');
  return Math.max(s / x, 0);
}

/** x with P(T ≤ x) = p (lower) or P(T > x) = p (upper), 0 < p ≤ ½. */
export function nctSolve(p: number, nu: number, delta: number, lower: boolean): number {
  const tail = (x: number): number => (lower ? nctTails(x, nu, delta).lower : nctTails(x, nu, delta).upper);
  // start: the normal approximation (x(1 − 1/(4ν)) − δ)/sqrt(1 + x²/(2ν)) = z (A&S 26.7.10)
  const zq = normalUpperQuantile(p) * (lower ? -1 : 1);
  const c = 1 - 1 / (4 * nu);
  const qa = c * c - (zq * zq) / (2 * nu);
  const qb = -2 * c * delta;
  const qc = delta * delta - zq * zq;
  const disc = qb * qb - 4 * qa * qc;
  let x0 = delta + zq;
  if (qa > 0 && disc >= 0) {
    const r1 = (-qb + Math.sqrt(disc)) / (2 * qa);
    const r2 = (-qb - Math.sqrt(disc)) / (2 * qa);
    x0 = zq >= 0 ? Math.max(r1, r2) : Math.min(r1, r2);
  }
  // bracket: g(x) = tail(x) − p changes sign; tail increasing for lower, decreasing for upper
  const dir = lower ? 1 : -1;
  const g = (x: number): number => dir * (tail(x) - p);
  let lo = x0;
  let hi = x0;
  let step = Math.max(1, Math.abs(x0)) * 0.1;
  let glo = g(lo);
  let ghi = glo;
  if (glo > 0) {
    while (glo > 0) {
      hi = lo;
      ghi = glo;
      lo -= step;
      step *= 2;
      glo = g(lo);
      if (!Number.isFinite(lo)) return -Infinity;
    }
  } else {
    while (ghi <= 0) {
      lo = hi;
      glo = ghi;
      hi += step;
      step *= 2;
      ghi = g(hi);
      if (!Number.isFinite(hi)) return Infinity;
    }
  }
  // safeguarded Newton inside [lo, hi] with g(lo) ≤ 0 < g(hi)
  let x = glo === 0 ? lo : 0.5 * (lo + hi);
  if (glo === 0) return lo;
  for (let it = 0; it < 200; it++) {
    const gx = g(x);
    if (gx === 0) return x;
    if (gx > 0) hi = x;
    else lo = x;
    const f = nctDensity(x, nu, delta);
    let next = x - gx / f;
    if (!(next > lo && next < hi) || !Number.isFinite(next)) next = 0.5 * (lo + hi);
    if (Math.abs(next - x) <= 2 * Number.EPSILON * Math.abs(x) || next === lo || next === hi) return next;
    x = next;
  }
  return x;
}
