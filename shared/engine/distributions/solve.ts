/**
 * Quantile search shared by the distribution families: Newton's method on the logarithm of the
 * tail probability as a function of log x (x > 0).
 *
 * Why this form: for every family here the density of log X is log-concave (normal, chi-square,
 * F, and |t| for the t distribution), hence so are its cdf and survival function (Prékopa 1973),
 * so h(w) = log T(e^w) − log p is monotone and concave in w = log x. Newton's method on a concave
 * monotone function converges from any start, after the first step from one side without
 * overshoot, and quadratically near the root (Ortega & Rheinboldt 1970, §13.3); a bracket guards
 * against rounding at the end. Steps are applied as x·exp(Δw), so that x keeps full relative
 * precision even near 1e-300. Working on log T lets the upper tail be solved for q = 1e-300 as
 * well as the lower tail for p = 1e-300.
 */

export interface TailAndDensity {
  /** log of the tail probability being matched (lower or upper) */
  logTail: number;
  /** log of the density at x */
  logDensity: number;
}

/**
 * Finds x > 0 with T(x) = target, where T is increasing (`increasing` = true, a lower tail) or
 * decreasing (an upper tail) and 0 < target ≤ ½ is the probability in that tail.
 */
export function solveTail(
  evaluate: (x: number) => TailAndDensity,
  target: number,
  increasing: boolean,
  start: number,
): number {
  const logTarget = Math.log(target);
  const sign = increasing ? 1 : -1;
  let x = start > 0 && Number.isFinite(start) ? start : 1;
  let lo = 0; // bracket in x: the root is in (lo, hi)
  let hi = Infinity;
  let lastStep = Infinity;
  for (let iter = 0; iter < 300; iter++) {
    const { logTail, logDensity } = evaluate(x);
    const h = logTail - logTarget;
    if (h === 0) return x;
    // h > 0 means the tail is too big: for a lower tail, x is too large.
    if (h * sign > 0) hi = Math.min(hi, x);
    else lo = Math.max(lo, x);
    // slope of h in w = log x
    const slope = sign * Math.exp(Math.log(x) + logDensity - logTail);
    let dw = -h / slope;
    let next = x * Math.exp(dw);
    if (!Number.isFinite(dw) || !(next > lo && next < hi)) {
      // outside the bracket (or no usable slope): bisect, geometrically when the bracket spans decades
      if (hi === Infinity) next = x * (h * sign > 0 ? 0.5 : 4);
      else if (lo === 0) next = hi * 0.25;
      else next = hi / lo > 4 ? Math.sqrt(lo * hi) : 0.5 * (lo + hi);
      if (next === x) return x;
      dw = Math.log(next / x);
    }
    if (Math.abs(dw) <= 2 * Number.EPSILON) return next;
    // stop on a rounding-level two-cycle
    if (Math.abs(dw) <= 1e-13 && Math.abs(dw) >= Math.abs(lastStep)) return next;
    lastStep = dw;
    x = next;
  }
  return x;
}
