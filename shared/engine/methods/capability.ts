/**
 * Process capability and normal tolerance intervals.
 *
 * Indices (NIST/SEMATECH e-Handbook 6.1.6): Cp = (USL − LSL)/(6s), Cpu = (USL − x̄)/(3s),
 * Cpl = (x̄ − LSL)/(3s), Cpk = min(Cpu, Cpl). Example: USL 20, LSL 8, x̄ 16, s 2 → Cp = 1,
 * Cpk = Cpu = 0.6667, Cpl = 1.3333.
 * Bounds at level 1 − α, ν = n − 1:
 *   Cp:  Cp sqrt(χ²_{α/2,ν}/ν) … Cp sqrt(χ²_{1−α/2,ν}/ν)  (chi-square, NIST 6.1.6)
 *   Cpk: Cpk ± z_{1−α/2} sqrt(1/(9n) + Cpk²/(2(n − 1)))  (Bissell 1990, "How reliable is your
 *        capability index?", Applied Statistics 39(3), 331–340)
 * Examples: Cpk = 1.15, n = 45 → 0.8907 – 1.4093; USL 62, LSL 38, n = 20, s = 1.75 →
 *   Cp = 2.2857, 95 % 1.5649 – 3.0056.
 * Expected fraction outside, normal model: Φ((LSL − x̄)/s) + Φ((x̄ − USL)/s).
 *
 * Normal tolerance intervals x̄ ± k s covering a proportion p with confidence γ, ν = n − 1:
 * - Two-sided, Howe (1969), "Two-sided tolerance limits for normal populations — some
 *   improvements", JASA 64 (NIST 7.2.6.3): k₂ = sqrt( ν (1 + 1/n) z²_{(1+p)/2} / χ²_{1−γ,ν} ).
 * - Two-sided, exact (Odeh & Owen 1980, "Tables for normal tolerance limits, sampling plans and
 *   screening"): k solves
 *     γ = 2 ∫₀^∞ φ(u) P( χ²_ν > ν r²(u/√n; p) / k² ) du,
 *   where r(z; p) solves Φ(z + r) − Φ(z − r) = p; integrated numerically (composite Gauss-Legendre).
 * - One-sided, exact: k₁ = t′_{γ}(ν, z_p √n) / √n, the γ-quantile of the noncentral t.
 * - One-sided, Natrella (1963) approximation: k₁ = (z_p + sqrt(z_p² − ab))/a,
 *   a = 1 − z_γ²/(2ν), b = z_p² − z_γ²/n.
 * NIST 7.2.6.3 (n = 43, p = 0.90, γ = 0.99): k₂ = 2.2173 (Howe), 2.2228 (exact), k₁ = 1.8740
 * (noncentral t), 1.8752 (Natrella).
 */
import { chisqQuantile, chisqQuantileUpper, chisqSf, nctQuantile, normCdf, normPdf, normQuantileUpper, normSf } from '../distributions/index';
import { MethodInputError, requireProbability } from './errors';
import { findRoot, integrate } from './numeric';

export interface CapabilityInput {
  n: number;
  mean: number;
  sd: number;
  lsl?: number;
  usl?: number;
  level: number;
}

export interface Capability {
  cp: number | null;
  cpu: number | null;
  cpl: number | null;
  cpk: number | null;
  cpLower: number | null;
  cpUpper: number | null;
  cpkLower: number | null;
  cpkUpper: number | null;
  fractionBelow: number | null;
  fractionAbove: number | null;
  fractionOutside: number;
}

export function capability(input: CapabilityInput): Capability {
  const { n, mean, sd, lsl, usl, level } = input;
  if (!Number.isInteger(n) || n < 2) throw new MethodInputError('insufficient-data', 'n', `needs n ≥ 2 (got ${n})`);
  if (!Number.isFinite(mean) || !Number.isFinite(sd)) throw new MethodInputError('non-finite', 'values', 'the mean and sd must be finite');
  if (sd === 0) throw new MethodInputError('zero-variance', 'values', 'the standard deviation is zero; capability indices are not defined');
  requireProbability(level, 'level');
  if (lsl === undefined && usl === undefined) throw new MethodInputError('invalid-parameter', 'limits', 'give at least one specification limit (lsl or usl)');
  if (lsl !== undefined && usl !== undefined && !(lsl < usl)) {
    throw new MethodInputError('invalid-parameter', 'limits', `the lower specification limit (${lsl}) must be below the upper (${usl})`);
  }
  const df = n - 1;
  const alpha = 1 - level;
  const z = normQuantileUpper(alpha / 2);
  const cpu = usl !== undefined ? (usl - mean) / (3 * sd) : null;
  const cpl = lsl !== undefined ? (mean - lsl) / (3 * sd) : null;
  const cp = usl !== undefined && lsl !== undefined ? (usl - lsl) / (6 * sd) : null;
  const cpk = cpu !== null && cpl !== null ? Math.min(cpu, cpl) : (cpu ?? cpl);
  let cpLower: number | null = null;
  let cpUpper: number | null = null;
  if (cp !== null) {
    cpLower = cp * Math.sqrt(chisqQuantile(alpha / 2, df) / df);
    cpUpper = cp * Math.sqrt(chisqQuantileUpper(alpha / 2, df) / df);
  }
  let cpkLower: number | null = null;
  let cpkUpper: number | null = null;
  if (cpk !== null) {
    const half = z * Math.sqrt(1 / (9 * n) + (cpk * cpk) / (2 * (n - 1)));
    cpkLower = cpk - half;
    cpkUpper = cpk + half;
  }
  const fractionBelow = lsl !== undefined ? normCdf((lsl - mean) / sd) : null;
  const fractionAbove = usl !== undefined ? normSf((usl - mean) / sd) : null;
  return {
    cp,
    cpu,
    cpl,
    cpk,
    cpLower,
    cpUpper,
    cpkLower,
    cpkUpper,
    fractionBelow,
    fractionAbove,
    fractionOutside: (fractionBelow ?? 0) + (fractionAbove ?? 0),
  };
}

function checkTolerance(n: number, coverage: number, confidence: number): void {
  if (!Number.isInteger(n) || n < 2) throw new MethodInputError('insufficient-data', 'n', `needs n ≥ 2 (got ${n})`);
  requireProbability(coverage, 'coverage', 'coverage proportion');
  requireProbability(confidence, 'confidence');
}

/** Howe's two-sided tolerance factor k₂. */
export function toleranceFactorHowe(n: number, coverage: number, confidence: number): number {
  checkTolerance(n, coverage, confidence);
  const df = n - 1;
  const z = normQuantileUpper((1 - coverage) / 2);
  return Math.sqrt((df * (1 + 1 / n) * z * z) / chisqQuantile(1 - confidence, df));
}

/** r with Φ(z + r) − Φ(z − r) = p (z ≥ 0). */
export function coverageHalfWidth(z: number, p: number): number {
  // Start from the centred value and apply Newton's method; the function is increasing and concave for r > 0.
  const q = 1 - p; // mass outside
  let r = normQuantileUpper(q / 2) + z;
  for (let i = 0; i < 100; i++) {
    // outside mass: Φ(z − r) + (1 − Φ(z + r)), written with upper tails for precision
    const outside = normSf(r - z) + normSf(z + r);
    const f = q - outside; // increasing in r
    const df = normPdf(r - z) + normPdf(z + r);
    const step = f / df;
    r -= step;
    if (Math.abs(step) <= 1e-15 * r) break;
  }
  return r;
}

/** Confidence that x̄ ± k s covers at least p of a normal population (two-sided, exact). */
export function twoSidedToleranceConfidence(n: number, coverage: number, k: number): number {
  return twoSidedToleranceConfidenceOf(n, coverage)(k);
}

/**
 * The coverage confidence as a function of k for one n and p. The integrand's factors that do not
 * depend on k (the half-width r(u) and the density φ(u) at the fixed Gauss-Legendre nodes) are
 * computed once and kept, so that the root search on k costs one chi-square tail per node and
 * call; the values are the same, bit for bit, as computing them afresh.
 */
function twoSidedToleranceConfidenceOf(n: number, coverage: number): (k: number) => number {
  const df = n - 1;
  const sqrtN = Math.sqrt(n);
  const atNode = new Map<number, { scaled: number; density: number }>();
  return (k: number) =>
    2 *
    integrate(
      (u: number) => {
        let node = atNode.get(u);
        if (!node) {
          const r = coverageHalfWidth(u / sqrtN, coverage);
          node = { scaled: df * r * r, density: normPdf(u) };
          atNode.set(u, node);
        }
        return node.density * chisqSf(node.scaled / (k * k), df);
      },
      0,
      10,
      24,
    );
}

/** Exact two-sided tolerance factor (Odeh & Owen), by root finding on the coverage confidence. */
export function toleranceFactorExact(n: number, coverage: number, confidence: number): number {
  checkTolerance(n, coverage, confidence);
  const howe = toleranceFactorHowe(n, coverage, confidence);
  const confidenceAt = twoSidedToleranceConfidenceOf(n, coverage);
  const g = (k: number) => confidenceAt(k) - confidence;
  let lo = howe * 0.9;
  let hi = howe * 1.1;
  while (g(lo) > 0) lo *= 0.8;
  while (g(hi) < 0) hi *= 1.25;
  return findRoot(g, lo, hi, 1e-14 * howe);
}

/** Exact one-sided tolerance factor k₁ through the noncentral t. */
export function toleranceFactorOneSided(n: number, coverage: number, confidence: number): number {
  checkTolerance(n, coverage, confidence);
  const zp = normQuantileUpper(1 - coverage);
  return nctQuantile(confidence, n - 1, zp * Math.sqrt(n)) / Math.sqrt(n);
}

/** Natrella's approximation to the one-sided factor (shown beside the exact one). */
export function toleranceFactorOneSidedNatrella(n: number, coverage: number, confidence: number): number {
  checkTolerance(n, coverage, confidence);
  const zp = normQuantileUpper(1 - coverage);
  const zg = normQuantileUpper(1 - confidence);
  const a = 1 - (zg * zg) / (2 * (n - 1));
  const b = zp * zp - (zg * zg) / n;
  return (zp + Math.sqrt(zp * zp - a * b)) / a;
}
