/**
 * Public API of the distribution functions used by every method of the engine. Importers use only
 * this module.
 *
 * Accuracy (tested against R 4.2.2 fixtures in test/fixtures/r/distributions.json and 30-digit
 * reference values in test/fixtures/mpmath/noncentral-t.json; tolerances stated per function in
 * test/engine/distributions.test.ts): relative error at most 1e-12 for df from 1 to 1e7 and
 * probabilities from 1e-300 to 1 − 1e-16, for normal, Student t, chi-square and F pdf, cdf,
 * survival function and both quantiles; the noncentral t to about 1e-12 as well (where R's own
 * pt(ncp=) is limited to ~1e-12 absolute, see the tests).
 *
 * Every `...Sf` is the upper tail P(X > x), computed directly (never as 1 − cdf), and every
 * `...QuantileUpper(q)` is the x with Sf(x) = q, solved on the survival function, so that
 * q = 1e-300 works as well as p = 1e-300 for the lower quantile.
 *
 * Argument rules (the same for every function):
 * - A degrees-of-freedom argument must be a finite number > 0, a noncentrality a finite number,
 *   else a RangeError naming the function and the argument is thrown.
 * - x = NaN throws a RangeError; x = ±Infinity is allowed (cdf 0 or 1, sf 1 or 0, pdf 0).
 * - For chi-square and F, x < 0 lies outside the support: cdf 0, sf 1, pdf 0. At x = 0 the pdf is
 *   Infinity, the finite limit or 0 as the shape gives (chi-square: df < 2, = 2 (½), > 2; F: d1 < 2,
 *   = 2 (1), > 2).
 * - A probability p (or q) must be in [0, 1], else (NaN included) a RangeError naming it is thrown.
 *   p = 0 gives the lower end of the support exactly (−Infinity for normal, t and noncentral t; 0
 *   for chi-square and F), p = 1 gives +Infinity; for upper quantiles q = 0 gives +Infinity and
 *   q = 1 the lower end. A quantile too small or too large for a double comes back as 0 or
 *   ±Infinity (e.g. chisqQuantile(1e-300, 1) = 0, as in R).
 */
import { normalDensity, normalUpper, normalUpperQuantile } from './normal';
import { chisqLogDensity, chisqSolve, regularizedGamma } from './gamma';
import { fLogDensity, fLogTails, fSolve } from './f';
import { tLogDensity, tLogTailsPositive, tSolveUpper } from './t';
import { nctDensity, nctSolve, nctTails } from './noncentral-t';

export { regularizedGamma, type GammaTails } from './gamma';
export { regularizedBeta, logRegularizedBeta, type BetaTails } from './beta';
export { lgamma, logBeta } from './special';

function checkX(fn: string, x: number): void {
  if (typeof x !== 'number' || Number.isNaN(x)) throw new RangeError(`${fn}: x must be a number (got ${String(x)})`);
}
function checkDf(fn: string, name: string, df: number): void {
  if (typeof df !== 'number' || !(df > 0) || !Number.isFinite(df)) {
    throw new RangeError(`${fn}: ${name} must be a finite number > 0 (got ${String(df)})`);
  }
}
function checkNcp(fn: string, ncp: number): void {
  if (typeof ncp !== 'number' || !Number.isFinite(ncp)) throw new RangeError(`${fn}: ncp must be a finite number (got ${String(ncp)})`);
}
function checkP(fn: string, name: string, p: number): void {
  if (typeof p !== 'number' || !(p >= 0 && p <= 1)) throw new RangeError(`${fn}: ${name} must be in [0, 1] (got ${String(p)})`);
}

// ---- normal -------------------------------------------------------------------------------------

/** Standard normal density φ(x) (exp(−x²/2) formed without the rounding of x²). */
export function normPdf(x: number): number {
  checkX('normPdf', x);
  return normalDensity(x);
}
/** Φ(x), Cody (1969) rational approximations of erfc. */
export function normCdf(x: number): number {
  checkX('normCdf', x);
  return normalUpper(-x);
}
/** 1 − Φ(x), computed directly. */
export function normSf(x: number): number {
  checkX('normSf', x);
  return normalUpper(x);
}
/** Φ⁻¹(p): Wichura (1988) AS 241 with a Halley step. */
export function normQuantile(p: number): number {
  checkP('normQuantile', 'p', p);
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  return p <= 0.5 ? -normalUpperQuantile(p) : normalUpperQuantile(1 - p);
}
/** The x with 1 − Φ(x) = q. */
export function normQuantileUpper(q: number): number {
  checkP('normQuantileUpper', 'q', q);
  if (q === 0) return Infinity;
  if (q === 1) return -Infinity;
  return q <= 0.5 ? normalUpperQuantile(q) : -normalUpperQuantile(1 - q);
}

// ---- chi-square ---------------------------------------------------------------------------------

export function chisqPdf(x: number, df: number): number {
  checkX('chisqPdf', x);
  checkDf('chisqPdf', 'df', df);
  if (x < 0 || x === Infinity) return 0;
  if (x === 0) return df < 2 ? Infinity : df === 2 ? 0.5 : 0;
  return Math.exp(chisqLogDensity(x, df));
}
/** P(X ≤ x) = P(df/2, x/2), the regularized lower incomplete gamma function. */
export function chisqCdf(x: number, df: number): number {
  checkX('chisqCdf', x);
  checkDf('chisqCdf', 'df', df);
  return regularizedGamma(df / 2, x / 2).lower;
}
/** P(X > x) = Q(df/2, x/2), computed directly. */
export function chisqSf(x: number, df: number): number {
  checkX('chisqSf', x);
  checkDf('chisqSf', 'df', df);
  return regularizedGamma(df / 2, x / 2).upper;
}
export function chisqQuantile(p: number, df: number): number {
  checkP('chisqQuantile', 'p', p);
  checkDf('chisqQuantile', 'df', df);
  if (p === 0) return 0;
  if (p === 1) return Infinity;
  return p <= 0.5 ? chisqSolve(p, df, true) : chisqSolve(1 - p, df, false);
}
export function chisqQuantileUpper(q: number, df: number): number {
  checkP('chisqQuantileUpper', 'q', q);
  checkDf('chisqQuantileUpper', 'df', df);
  if (q === 0) return Infinity;
  if (q === 1) return 0;
  return q <= 0.5 ? chisqSolve(q, df, false) : chisqSolve(1 - q, df, true);
}

// ---- F ------------------------------------------------------------------------------------------

function checkF(fn: string, d1: number, d2: number): void {
  checkDf(fn, 'd1', d1);
  checkDf(fn, 'd2', d2);
}
export function fPdf(x: number, d1: number, d2: number): number {
  checkX('fPdf', x);
  checkF('fPdf', d1, d2);
  if (x < 0 || x === Infinity) return 0;
  if (x === 0) return d1 < 2 ? Infinity : d1 === 2 ? 1 : 0;
  return Math.exp(fLogDensity(x, d1, d2));
}
export function fCdf(x: number, d1: number, d2: number): number {
  checkX('fCdf', x);
  checkF('fCdf', d1, d2);
  if (x <= 0) return 0;
  if (x === Infinity) return 1;
  return Math.exp(fLogTails(x, d1, d2).lower);
}
export function fSf(x: number, d1: number, d2: number): number {
  checkX('fSf', x);
  checkF('fSf', d1, d2);
  if (x <= 0) return 1;
  if (x === Infinity) return 0;
  return Math.exp(fLogTails(x, d1, d2).upper);
}
export function fQuantile(p: number, d1: number, d2: number): number {
  checkP('fQuantile', 'p', p);
  checkF('fQuantile', d1, d2);
  if (p === 0) return 0;
  if (p === 1) return Infinity;
  return p <= 0.5 ? fSolve(p, d1, d2, true) : fSolve(1 - p, d1, d2, false);
}
export function fQuantileUpper(q: number, d1: number, d2: number): number {
  checkP('fQuantileUpper', 'q', q);
  checkF('fQuantileUpper', d1, d2);
  if (q === 0) return Infinity;
  if (q === 1) return 0;
  return q <= 0.5 ? fSolve(q, d1, d2, false) : fSolve(1 - q, d1, d2, true);
}

// ---- Student t ----------------------------------------------------------------------------------

export function tPdf(x: number, df: number): number {
  checkX('tPdf', x);
  checkDf('tPdf', 'df', df);
  if (!Number.isFinite(x)) return 0;
  return Math.exp(tLogDensity(x, df));
}
function tTail(x: number, df: number): number {
  // P(T > |x|)
  return Math.exp(tLogTailsPositive(Math.abs(x), df).tail);
}
function tCentral(x: number, df: number): number {
  // P(0 < T ≤ |x|)
  return Math.exp(tLogTailsPositive(Math.abs(x), df).central);
}
export function tCdf(x: number, df: number): number {
  checkX('tCdf', x);
  checkDf('tCdf', 'df', df);
  if (x === -Infinity) return 0;
  if (x === Infinity) return 1;
  return x <= 0 ? tTail(x, df) : 0.5 + tCentral(x, df);
}
export function tSf(x: number, df: number): number {
  checkX('tSf', x);
  checkDf('tSf', 'df', df);
  if (x === -Infinity) return 1;
  if (x === Infinity) return 0;
  return x >= 0 ? tTail(x, df) : 0.5 + tCentral(x, df);
}
export function tQuantile(p: number, df: number): number {
  checkP('tQuantile', 'p', p);
  checkDf('tQuantile', 'df', df);
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  if (p === 0.5) return 0;
  return p < 0.5 ? -tSolveUpper(p, df) : tSolveUpper(1 - p, df);
}
export function tQuantileUpper(q: number, df: number): number {
  checkP('tQuantileUpper', 'q', q);
  checkDf('tQuantileUpper', 'df', df);
  if (q === 0) return Infinity;
  if (q === 1) return -Infinity;
  if (q === 0.5) return 0;
  return q < 0.5 ? tSolveUpper(q, df) : -tSolveUpper(1 - q, df);
}

// ---- noncentral t -------------------------------------------------------------------------------

/** Density of the noncentral t (additive to the agreed contract). */
export function nctPdf(x: number, df: number, ncp: number): number {
  checkX('nctPdf', x);
  checkDf('nctPdf', 'df', df);
  checkNcp('nctPdf', ncp);
  if (!Number.isFinite(x)) return 0;
  return nctDensity(x, df, ncp);
}
/** P(T ≤ x) for the noncentral t with noncentrality ncp. */
export function nctCdf(x: number, df: number, ncp: number): number {
  checkX('nctCdf', x);
  checkDf('nctCdf', 'df', df);
  checkNcp('nctCdf', ncp);
  if (x === -Infinity) return 0;
  if (x === Infinity) return 1;
  return nctTails(x, df, ncp).lower;
}
/** P(T > x), computed directly. */
export function nctSf(x: number, df: number, ncp: number): number {
  checkX('nctSf', x);
  checkDf('nctSf', 'df', df);
  checkNcp('nctSf', ncp);
  if (x === -Infinity) return 1;
  if (x === Infinity) return 0;
  return nctTails(x, df, ncp).upper;
}
export function nctQuantile(p: number, df: number, ncp: number): number {
  checkP('nctQuantile', 'p', p);
  checkDf('nctQuantile', 'df', df);
  checkNcp('nctQuantile', ncp);
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  return p <= 0.5 ? nctSolve(p, df, ncp, true) : nctSolve(1 - p, df, ncp, false);
}
/** The x with P(T > x) = q (additive to the agreed contract). */
export function nctQuantileUpper(q: number, df: number, ncp: number): number {
  checkP('nctQuantileUpper', 'q', q);
  checkDf('nctQuantileUpper', 'df', df);
  checkNcp('nctQuantileUpper', ncp);
  if (q === 0) return Infinity;
  if (q === 1) return -Infinity;
  return q <= 0.5 ? nctSolve(q, df, ncp, false) : nctSolve(1 - q, df, ncp, true);
}
