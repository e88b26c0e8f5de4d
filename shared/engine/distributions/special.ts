/**
 * Special functions shared by the distribution routines: log-gamma, Stirling's error term, the
 * deviance term bd0 and the saddle-point densities built from them.
 *
 * Sources:
 * - C. Loader (2000), "Fast and Accurate Computation of Binomial Probabilities" (AT&T Labs
 *   technical note): the saddle-point forms of the Poisson and binomial densities,
 *   dpois(x; λ) = exp(−stirlerr(x) − bd0(x, λ)) / sqrt(2πx), with bd0(x, λ) = x log(x/λ) + λ − x
 *   summed as a series when x ≈ λ. They keep full relative accuracy for arguments up to 1e7 and
 *   beyond, where exp(x log λ − λ − lgamma(x + 1)) would lose eps·λ in the exponent.
 * - Abramowitz & Stegun (1964) 6.1.40–6.1.41: Stirling's series for log Γ.
 */

/** log(sqrt(2π)) */
export const LN_SQRT_2PI = 0.91893853320467274178032973640562;
/** 1/sqrt(2π) */
export const INV_SQRT_2PI = 0.398942280401432677939946059934;

// Stirling series coefficients of log Γ(z) − [(z − 1/2) log z − z + log sqrt(2π)]:
// B_{2k} / (2k (2k − 1)) for k = 1..8 (A&S 6.1.41).
const STIRLING = [
  1 / 12,
  -1 / 360,
  1 / 1260,
  -1 / 1680,
  1 / 1188,
  -691 / 360360,
  1 / 156,
  -3617 / 122400,
];

/** The Stirling series Σ c_k z^(1−2k); accurate to full precision for z ≥ 15. */
function stirlingSeries(z: number): number {
  const z2 = 1 / (z * z);
  let s = 0;
  for (let k = STIRLING.length - 1; k >= 0; k--) s = s * z2 + STIRLING[k];
  return s / z;
}

/**
 * log Γ(x) for x > 0. Stirling's series for x ≥ 15; below, the recurrence
 * log Γ(x) = log Γ(x + k) − log(x (x + 1) ⋯ (x + k − 1)) shifts the argument up.
 * Absolute error about 1e-15 for x < 15, relative error a few ulp above.
 */
export function lgamma(x: number): number {
  if (!(x > 0)) return x === 0 ? Infinity : NaN;
  if (x >= 15) return (x - 0.5) * Math.log(x) - x + LN_SQRT_2PI + stirlingSeries(x);
  let prod = 1;
  let z = x;
  while (z < 15) {
    prod *= z;
    z += 1;
  }
  return (z - 0.5) * Math.log(z) - z + LN_SQRT_2PI + stirlingSeries(z) - Math.log(prod);
}

/**
 * Stirling's error term stirlerr(n) = log Γ(n + 1) − [(n + 1/2) log n − n + log sqrt(2π)]
 * (Loader 2000). Series for n ≥ 15, from log Γ below.
 */
export function stirlerr(n: number): number {
  if (n >= 15) {
    // log Γ(n + 1) = log Γ(n) + log n, and the series above is for log Γ(n).
    return stirlingSeries(n);
  }
  return lgamma(n + 1) - (n + 0.5) * Math.log(n) + n - LN_SQRT_2PI;
}

/**
 * log(1 + x) − x, accurate also for small |x| (series in x/(2 + x) there; Loader 2000 uses the same
 * transformation for bd0).
 */
export function log1pmx(x: number): number {
  if (Math.abs(x) < 0.1) {
    // log(1 + x) = 2 atanh(v) with v = x / (2 + x): 2 (v + v³/3 + v⁵/5 + …)
    const v = x / (2 + x);
    const v2 = v * v;
    // log(1+x) − x = 2v − x + 2 Σ_{k≥1} v^(2k+1)/(2k+1) and 2v − x = −x v
    let term = 2 * v * v2;
    let s = -x * v;
    for (let k = 1; k < 60; k++) {
      const add = term / (2 * k + 1);
      const next = s + add;
      if (next === s) break;
      s = next;
      term *= v2;
    }
    return s;
  }
  return Math.log1p(x) - x;
}

/**
 * The deviance term bd0(x, m) = x log(x/m) + m − x ≥ 0 (Loader 2000), by the series
 * (x − m) v + 2x Σ_{j≥1} v^(2j+1)/(2j+1) with v = (x − m)/(x + m) when |x − m| < (x + m)/3.
 */
export function bd0(x: number, m: number): number {
  if (m === 0) return x === 0 ? 0 : Infinity;
  // The series keeps the rounding error at a few ulp of bd0 itself (x − m is exact for x/m in
  // [1/2, 2]); x log(x/m) + m − x would carry eps·x·|log(x/m)|, ruinous for large x.
  if (Math.abs(x - m) < (x + m) / 3) {
    const v = (x - m) / (x + m);
    let s = (x - m) * v;
    let ej = 2 * x * v;
    const v2 = v * v;
    for (let j = 1; j < 200; j++) {
      ej *= v2;
      const s1 = s + ej / (2 * j + 1);
      if (s1 === s) return s1;
      s = s1;
    }
    return s;
  }
  return x * Math.log(x / m) + m - x;
}

/**
 * bd0(x, m) with the deviation δ = x − m also given with its own precision (for the F distribution
 * δ is formed from 1 − F, exact near F = 1, where the rounding of m alone would cost κ·eps with a
 * condition number κ in the thousands at df = 1e7). The series uses δ; far from m the direct form
 * uses m.
 */
export function bd0WithDeviation(x: number, m: number, delta: number): number {
  const sum = x + m;
  if (Math.abs(delta) < sum / 3) {
    const v = delta / sum;
    let s = delta * v;
    let ej = 2 * x * v;
    const v2 = v * v;
    for (let j = 1; j < 200; j++) {
      ej *= v2;
      const s1 = s + ej / (2 * j + 1);
      if (s1 === s) return s1;
      s = s1;
    }
    return s;
  }
  if (m === 0) return Infinity;
  return x * Math.log(x / m) + m - x;
}

/**
 * log of the Poisson-type density D(a, y) = y^a e^(−y) / Γ(a + 1) for a > 0, y ≥ 0: the factor in
 * front of the series and continued fraction of the incomplete gamma function.
 */
export function logPoissonTerm(a: number, y: number): number {
  if (y === 0) return -Infinity;
  if (y < 1 && a < 30) {
    // y^a by pow keeps about 1 ulp where a log y would carry eps·|a log y| (690 eps at 1e-300)
    const pw = Math.pow(y, a);
    if (pw > 1e-280) return Math.log(pw) - y - lgamma(a + 1);
  }
  if (a < 1) return a * Math.log(y) - y - lgamma(a + 1);
  return -stirlerr(a) - bd0(a, y) - 0.5 * Math.log(2 * Math.PI * a);
}

/** D(a, y) = y^a e^(−y) / Γ(a + 1). */
export function poissonTerm(a: number, y: number): number {
  if (y === 0) return 0;
  if (a < 1) return Math.exp(a * Math.log(y) - y - lgamma(a + 1));
  return Math.exp(-stirlerr(a) - bd0(a, y)) / Math.sqrt(2 * Math.PI * a);
}

/** log B(a, b) = log Γ(a) + log Γ(b) − log Γ(a + b), through Stirling's error terms for large arguments. */
export function logBeta(a: number, b: number): number {
  const p = Math.min(a, b);
  const q = Math.max(a, b);
  if (p >= 15) {
    // Both large: log B = 0.5 log(2π) − 0.5 log q + (p − 0.5) log(p/(p+q)) + q log1p(−p/(p+q))
    //                   + stirlerr-type corrections (A&S 6.1.41 applied to each term).
    const corr = stirlingSeries(p) + stirlingSeries(q) - stirlingSeries(p + q);
    return -0.5 * Math.log(q) + LN_SQRT_2PI + corr + (p - 0.5) * Math.log(p / (p + q)) + q * Math.log1p(-p / (p + q));
  }
  if (q >= 15) {
    // p small, q large: log Γ(q) − log Γ(p + q) by Stirling, log Γ(p) directly.
    const corr = stirlingSeries(q) - stirlingSeries(p + q);
    return lgamma(p) + corr + p - p * Math.log(p + q) + (q - 0.5) * Math.log1p(-p / (p + q));
  }
  return lgamma(p) + lgamma(q) - lgamma(p + q);
}

/**
 * The factor x^a y^b / B(a, b) (y = 1 − x, passed separately to keep its precision) in front of the
 * incomplete beta continued fraction, as a logarithm. For a, b ≥ 1 it is taken from the binomial
 * saddle-point form: x^a y^b Γ(a+b)/(Γ(a)Γ(b)) = (ab/n) · Γ(n+1)/(Γ(a+1)Γ(b+1)) x^a y^b with n = a + b,
 * and Γ(n+1)/(Γ(a+1)Γ(b+1)) x^a y^b = exp(stirlerr(n) − stirlerr(a) − stirlerr(b) − bd0(a, nx) − bd0(b, ny))
 * · sqrt(n / (2π a b)) (Loader 2000).
 */
export function logBetaTerm(x: number, y: number, a: number, b: number, lambda?: number): number {
  if (x === 0 || y === 0) return -Infinity;
  if (a >= 1 && b >= 1) {
    const n = a + b;
    // λ = a − n x = −(b − n y): the deviations of both bd0 terms
    const dev = lambda ?? (x < y ? a - n * x : n * y - b);
    return (
      Math.log((a * b) / n) +
      stirlerr(n) -
      stirlerr(a) -
      stirlerr(b) -
      bd0WithDeviation(a, n * x, dev) -
      bd0WithDeviation(b, n * y, -dev) +
      0.5 * Math.log(n / (2 * Math.PI * a * b))
    );
  }
  // Take the logarithm of whichever of x, y is below 1/2 directly, the other through log1p, so a
  // value near 1 (as x = n/(n + t²) for a t with large n) keeps the precision of its complement.
  const lx = x < 0.5 ? Math.log(x) : Math.log1p(-y);
  const ly = y < 0.5 ? Math.log(y) : Math.log1p(-x);
  return a * lx + b * ly - logBeta(a, b);
}
