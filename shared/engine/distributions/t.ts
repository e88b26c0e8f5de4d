/**
 * Student's t distribution through the regularized incomplete beta function:
 * P(|T| > x) = I_{n/(n+x²)}(n/2, 1/2) (Abramowitz & Stegun 26.7.1 with 26.5.27), the two tails
 * taken directly from the incomplete beta in the orientation where it converges (beta.ts). For
 * x² > 1e300·n (where n/(n + x²) underflows) the leading term I_z(a, b) ≈ z^a/(a B(a, b)) is used
 * in log form. The density uses Loader's (2000) Stirling-error form of the normalizing constant,
 * Γ((n+1)/2)/(Γ(n/2)√(nπ)) = exp(h·log1pmx(1/(2h)) + stirlerr(h + ½) − stirlerr(h))/√(2π) with
 * h = n/2, accurate for n up to 1e7 and beyond.
 * Quantiles: Newton on the log tail in log x (solve.ts); near the median the central probability
 * P(0 < T < x) = ½ − q is solved instead, which keeps relative accuracy in x → 0. Starting values
 * from the Cornish-Fisher expansion in the normal quantile (A&S 26.7.5) or the tail asymptote.
 */
import { logRegularizedBeta } from './beta';
import { normalUpperQuantile } from './normal';
import { LN_SQRT_2PI, log1pmx, logBeta, stirlerr } from './special';
import { solveTail } from './solve';

/** log P(T > x) for x ≥ 0, and log P(0 < T ≤ x) (the central part). */
export function tLogTailsPositive(x: number, n: number): { tail: number; central: number } {
  const x2 = x * x;
  if (x2 > 1e300 * n || !Number.isFinite(x2)) {
    const logz = Math.log(n) - 2 * Math.log(x);
    const a = n / 2;
    const tail = Math.log(0.5) + a * logz - Math.log(a) - logBeta(a, 0.5);
    return { tail, central: Math.log(0.5) + Math.log1p(-2 * Math.exp(tail)) };
  }
  const w = n + x2;
  // P(|T| ≤ x) = I_{x²/(n+x²)}(1/2, n/2); λ = 1/2 − (1/2 + n/2) x²/(n + x²) = n (1 − x²)/(2w)
  const r = logRegularizedBeta(x2 / w, n / w, 0.5, n / 2, (n * (1 - x2)) / (2 * w));
  return { tail: Math.log(0.5) + r.upper, central: Math.log(0.5) + r.lower };
}

export function tLogDensity(x: number, n: number): number {
  const h = n / 2;
  const logC = -LN_SQRT_2PI + h * log1pmx(1 / (2 * h)) + stirlerr(h + 0.5) - stirlerr(h);
  const x2 = x * x;
  const l = Number.isFinite(x2) && x2 < 1e300 * n ? Math.log1p(x2 / n) : 2 * Math.log(Math.abs(x)) - Math.log(n);
  return logC - ((n + 1) / 2) * l;
}

function tStart(q: number, n: number): number {
  const z = normalUpperQuantile(q);
  const z2 = z * z;
  const cf = z + (z * (z2 + 1)) / (4 * n) + (z * ((5 * z2 + 16) * z2 + 3)) / (96 * n * n);
  const a = n / 2;
  const asym = Math.exp((Math.log(0.5) + a * Math.log(n) - Math.log(a) - logBeta(a, 0.5) - Math.log(q)) / n);
  if (Number.isFinite(asym) && asym > cf) return asym;
  return cf > 0 ? cf : 1;
}

/** x > 0 with P(T > x) = q, 0 < q < ½. */
export function tSolveUpper(q: number, n: number): number {
  // Where x² > 1e300·n the tail is exactly its leading term (see tLogTailsPositive): solve it directly.
  const a = n / 2;
  const asym = Math.exp((Math.log(0.5) + a * Math.log(n) - Math.log(a) - logBeta(a, 0.5) - Math.log(q)) / n);
  if (asym * asym > 1e301 * n) return asym;
  if (q > 0.25) {
    const c = 0.5 - q; // exact
    return solveTail(
      (x) => ({ logTail: tLogTailsPositive(x, n).central, logDensity: tLogDensity(x, n) }),
      c,
      true,
      Math.max(tStart(q, n), 1e-300),
    );
  }
  return solveTail(
    (x) => ({ logTail: tLogTailsPositive(x, n).tail, logDensity: tLogDensity(x, n) }),
    q,
    false,
    tStart(q, n),
  );
}
