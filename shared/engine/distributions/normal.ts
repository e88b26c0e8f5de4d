/**
 * The standard normal distribution.
 *
 * Sources:
 * - W. J. Cody (1969), "Rational Chebyshev approximations for the error function", Mathematics of
 *   Computation 23, 631–637, as in Cody's CALERF routine (the rational functions for erf on
 *   |y| ≤ 0.46875, erfc on 0.46875 < y ≤ 4 and erfc·e^(y²)·y on y > 4). The coefficients are the
 *   published ones (also used by math.js's erf).
 * - M. J. Wichura (1988), "Algorithm AS 241: The percentage points of the normal distribution",
 *   Applied Statistics 37, 477–484 (PPND16), followed by one Halley step on the log tail.
 *
 * exp(−x²/2) is formed as exp(−h²/2)·exp(−(x − h)(x + h)/2) with h = x rounded to 1/16, so that the
 * rounding of x² does not cost eps·x²/2 relative accuracy in the far tails (x up to 38).
 */
import { INV_SQRT_2PI } from './special';

const THRESH = 0.46875;
const SQRPI = 5.6418958354775628695e-1; // 1/sqrt(π)
/** exp(−x²/2) without the rounding error of x². */
export function expHalfSquare(x: number): number {
  const ax = Math.abs(x);
  const h = Math.trunc(ax * 16) / 16;
  const del = (ax - h) * (ax + h);
  return Math.exp(-0.5 * h * h) * Math.exp(-0.5 * del);
}

/**
 * erf(y) for |y| ≤ 0.46875 (Cody's first rational function). The Horner loops of CALERF are
 * written out with the coefficients as constants (the same operations in the same order, so the
 * same bits): these functions run once per value in Anderson-Darling and the tolerance integrals.
 */
function erfSmall(y: number): number {
  const ysq = y * y;
  const xnum = ((((0.185777706184603153 * ysq + 3.1611237438705656) * ysq + 113.864154151050156) * ysq + 377.485237685302021) * ysq);
  const xden = (((ysq + 23.6012909523441209) * ysq + 244.024637934444173) * ysq + 1282.61652607737228) * ysq;
  return (y * (xnum + 3209.37758913846947)) / (xden + 2844.23683343917062);
}

/**
 * erfc(y)·e^(y²) for y > 0.46875 (Cody's second and third rational functions), so that
 * Φ̄(x) = ½ e^(−x²/2) · erfcScaled(x/√2).
 */
function erfcScaled(y: number): number {
  if (y <= 4) {
    let xnum = 2.15311535474403846e-8 * y;
    let xden = y;
    xnum = (xnum + 0.564188496988670089) * y;
    xden = (xden + 15.7449261107098347) * y;
    xnum = (xnum + 8.88314979438837594) * y;
    xden = (xden + 117.693950891312499) * y;
    xnum = (xnum + 66.1191906371416295) * y;
    xden = (xden + 537.181101862009858) * y;
    xnum = (xnum + 298.635138197400131) * y;
    xden = (xden + 1621.38957456669019) * y;
    xnum = (xnum + 881.95222124176909) * y;
    xden = (xden + 3290.79923573345963) * y;
    xnum = (xnum + 1712.04761263407058) * y;
    xden = (xden + 4362.61909014324716) * y;
    xnum = (xnum + 2051.07837782607147) * y;
    xden = (xden + 3439.36767414372164) * y;
    return (xnum + 1230.33935479799725) / (xden + 1230.33935480374942);
  }
  const ysq = 1 / (y * y);
  let xnum = 0.0163153871373020978 * ysq;
  let xden = ysq;
  xnum = (xnum + 0.305326634961232344) * ysq;
  xden = (xden + 2.56852019228982242) * ysq;
  xnum = (xnum + 0.360344899949804439) * ysq;
  xden = (xden + 1.87295284992346047) * ysq;
  xnum = (xnum + 0.125781726111229246) * ysq;
  xden = (xden + 0.527905102951428412) * ysq;
  xnum = (xnum + 0.0160837851487422766) * ysq;
  xden = (xden + 0.0605183413124413191) * ysq;
  const r = (ysq * (xnum + 6.58749161529837803e-4)) / (xden + 0.00233520497626869185);
  return (SQRPI - r) / y;
}

/**
 * The upper normal tail Φ̄(x) = ½ erfc(x/√2) for x ≥ 0.46875·√2, with erfc's rational part at
 * y = x/√2 and the Gaussian factor exp(−x²/2) formed from x itself.
 */
function upperTailLarge(x: number): number {
  return 0.5 * expHalfSquare(x) * erfcScaled(x * Math.SQRT1_2);
}

/**
 * Φ̄(x) for x ≥ 0 at about half the cost of normalUpper, for sums over many values
 * (Anderson-Darling): exp(−x²/2) is one exponential of the rounded x², so the relative error
 * grows to about (x²/4 + 4)·eps (13 eps at x = 6, where a sample of a million values ends)
 * instead of staying within a few eps; beyond x ≈ 37 the result is subnormal and loses relative
 * accuracy (Anderson-Darling switches to logarithms there). The distribution functions use normalUpper.
 */
export function normalUpperBulk(x: number): number {
  const y = x * Math.SQRT1_2;
  if (y <= THRESH) return 0.5 - 0.5 * erfSmall(y);
  return 0.5 * Math.exp(-0.5 * x * x) * erfcScaled(y);
}

/** Φ̄(x) = P(Z > x), computed directly in both tails. */
export function normalUpper(x: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x === Infinity) return 0;
  if (x === -Infinity) return 1;
  const y = Math.abs(x) * Math.SQRT1_2;
  if (y <= THRESH) return 0.5 - 0.5 * erfSmall(x * Math.SQRT1_2);
  if (x > 0) return x > 40 ? 0 : upperTailLarge(x);
  return 1 - upperTailLarge(-x);
}

/** Φ(x) − ½ = ½ erf(x/√2), with full relative accuracy near 0. */
export function normalCentral(x: number): number {
  const y = Math.abs(x) * Math.SQRT1_2;
  if (y <= THRESH) return 0.5 * erfSmall(x * Math.SQRT1_2);
  const t = 0.5 - upperTailLarge(Math.abs(x));
  return x < 0 ? -t : t;
}

export function normalDensity(x: number): number {
  if (!Number.isFinite(x)) return Number.isNaN(x) ? NaN : 0;
  return INV_SQRT_2PI * expHalfSquare(x);
}

// AS 241 (PPND16) coefficients
const A = [3.387132872796366608, 133.14166789178437745, 1971.5909503065514427, 13731.693765509461125,
  45921.953931549871457, 67265.770927008700853, 33430.575583588128105, 2509.0809287301226727];
const B = [1, 42.313330701600911252, 687.1870074920579083, 5394.1960214247511077, 21213.794301586595867,
  39307.89580009271061, 28729.085735721942674, 5226.495278852545925];
const C = [1.42343711074968357734, 4.6303378461565452959, 5.7694972214606914055, 3.64784832476320460504,
  1.27045825245236838258, 0.24178072517745061177, 0.0227238449892691845833, 7.7454501427834140764e-4];
const D = [1, 2.05319162663775882187, 1.6763848301838038494, 0.68976733498510000455, 0.14810397642748007459,
  0.0151986665636164571966, 5.475938084995344946e-4, 1.05075007164441684324e-9];
const E = [6.6579046435011037772, 5.4637849111641143699, 1.7848265399172913358, 0.29656057182850489123,
  0.026532189526576123093, 0.0012426609473880784386, 2.71155556874348757815e-5, 2.01033439929228813265e-7];
const F = [1, 0.59983220655588793769, 0.13692988092273580531, 0.0148753612908506148525,
  7.868691311456132591e-4, 1.8463183175100546818e-5, 1.4215117583164458887e-7, 2.04426310338993978564e-15];

function poly(c: number[], x: number): number {
  let s = c[7];
  for (let i = 6; i >= 0; i--) s = s * x + c[i];
  return s;
}

/**
 * The x > 0 with Φ̄(x) = q for 0 < q ≤ ½, or, through `central`, the x with Φ(x) − ½ = c.
 * AS 241 gives about 1e-16; the Halley step on log Φ̄ (or on the central part) removes what is left.
 */
export function normalUpperQuantile(q: number): number {
  if (q === 0) return Infinity;
  if (q === 0.5) return 0;
  let x: number;
  const c = 0.5 - q; // exact for q in [1/4, 1/2] (Sterbenz), and only used as a start otherwise
  if (c <= 0.425) {
    const r = 0.180625 - c * c;
    x = (c * poly(A, r)) / poly(B, r);
    // refine on the central part, which keeps relative accuracy for small x
    const f = normalDensity(x);
    const t = (normalCentral(x) - c) / f;
    x = x - t / (1 + 0.5 * x * t);
    return x;
  }
  let r = Math.sqrt(-Math.log(q));
  if (r <= 5) {
    r -= 1.6;
    x = poly(C, r) / poly(D, r);
  } else {
    r -= 5;
    x = poly(E, r) / poly(F, r);
  }
  // Halley step on g(x) = log Φ̄(x) − log q: g' = −φ/Φ̄, and the log form keeps the step well scaled.
  const s = normalUpper(x);
  const f = normalDensity(x);
  const u = ((Math.log(s) - Math.log(q)) * s) / f; // Newton step for Φ̄(x) = q in log form
  x = x + u / (1 - 0.5 * x * u);
  return x;
}
