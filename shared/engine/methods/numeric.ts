/** Small numerical tools shared by the methods: compensated sums, root finding, quadrature. */

/**
 * Neumaier's compensated sum (Neumaier 1974, "Rundungsfehleranalyse einiger Verfahren zur
 * Summation endlicher Summen", ZAMM 54): error bounded by about one rounding of the result,
 * independent of n, for any order of the terms.
 */
export function compensatedSum(values: ArrayLike<number>): number {
  let s = 0;
  let c = 0;
  for (let i = 0; i < values.length; i++) {
    const x = values[i];
    const t = s + x;
    if (Math.abs(s) >= Math.abs(x)) c += s - t + x;
    else c += x - t + s;
    s = t;
  }
  return s + c;
}

/**
 * Root of a continuous f on [a, b] with f(a), f(b) of opposite signs: bisection safeguarded
 * Illinois (regula falsi) steps, to an absolute x tolerance `tol` or a zero of f.
 */
export function findRoot(f: (x: number) => number, a: number, b: number, tol = 0, maxIterations = 400): number {
  let fa = f(a);
  let fb = f(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  if (Math.sign(fa) === Math.sign(fb)) throw new RangeError(`findRoot: no sign change on [${a}, ${b}]`);
  let side = 0;
  for (let i = 0; i < maxIterations; i++) {
    // Alternate Illinois steps with bisection so that the bracket always shrinks geometrically.
    let x = i % 3 === 2 ? 0.5 * (a + b) : (a * fb - b * fa) / (fb - fa);
    if (!(x > Math.min(a, b) && x < Math.max(a, b))) x = 0.5 * (a + b);
    const fx = f(x);
    if (fx === 0) return x;
    if (Math.sign(fx) === Math.sign(fb)) {
      b = x;
      fb = fx;
      if (side === -1) fa /= 2;
      side = -1;
    } else {
      a = x;
      fa = fx;
      if (side === 1) fb /= 2;
      side = 1;
    }
    const width = Math.abs(b - a);
    if (width <= tol || width <= 2 * Number.EPSILON * Math.max(Math.abs(a), Math.abs(b))) break;
  }
  return Math.abs(fa) < Math.abs(fb) ? a : b;
}

/**
 * Smallest integer n in [lo, ∞) with predicate(n) true, for a predicate that is false below some
 * n* and true from n* on (monotone). Doubling then bisection; `limit` caps the search.
 */
export function smallestInteger(predicate: (n: number) => boolean, lo: number, limit = 1e9): number | null {
  if (predicate(lo)) return lo;
  let bad = lo;
  let step = 1;
  let good = lo + step;
  while (!predicate(good)) {
    bad = good;
    step *= 2;
    good = lo + step;
    if (good > limit) return null;
  }
  while (good - bad > 1) {
    const mid = Math.floor((good + bad) / 2);
    if (predicate(mid)) good = mid;
    else bad = mid;
  }
  return good;
}

// 20-point Gauss-Legendre nodes and weights on [-1, 1] (positive half; symmetric).
const GL_X = [
  0.0765265211334973337546404, 0.2277858511416450780804962, 0.3737060887154195606725482, 0.5108670019508270980043641,
  0.6360536807265150254528367, 0.7463319064601507926143051, 0.8391169718222188233945291, 0.9122344282513259058677524,
  0.9639719272779137912676661, 0.9931285991850949247861224,
];
const GL_W = [
  0.1527533871307258506980843, 0.1491729864726037467878287, 0.1420961093183820513292983, 0.1316886384491766268984945,
  0.1181945319615184173123774, 0.1019301198172404350367501, 0.0832767415767047487247581, 0.0626720483341090635695065,
  0.0406014298003869413310400, 0.0176140071391521183118620,
];

/** ∫_a^b f by composite 20-point Gauss-Legendre on `panels` equal panels. */
export function integrate(f: (x: number) => number, a: number, b: number, panels = 16): number {
  const h = (b - a) / panels;
  let total = 0;
  let comp = 0;
  for (let p = 0; p < panels; p++) {
    const mid = a + (p + 0.5) * h;
    const half = 0.5 * h;
    let s = 0;
    for (let i = 0; i < GL_X.length; i++) {
      const dx = half * GL_X[i];
      s += GL_W[i] * (f(mid - dx) + f(mid + dx));
    }
    const term = s * half;
    const t = total + term;
    comp += Math.abs(total) >= Math.abs(term) ? total - t + term : term - t + total;
    total = t;
  }
  return total + comp;
}
