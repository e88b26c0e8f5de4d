/**
 * Comparing the spread of two or more groups.
 *
 * One-way ANOVA F (e.g. NIST/SEMATECH e-Handbook 7.4.3): with group sizes nᵢ, means x̄ᵢ,
 * variances sᵢ², N = Σnᵢ, grand mean x̄:
 *   SS_between = Σ nᵢ (x̄ᵢ − x̄)²,  SS_within = Σ (nᵢ − 1) sᵢ²,
 *   F = (SS_between / (k − 1)) / (SS_within / (N − k)),  p = P(F_{k−1,N−k} ≥ F).
 *
 * Bartlett (1937), "Properties of sufficiency and statistical tests", Proc. R. Soc. A 160
 * (NIST 1.3.5.7):
 *   K² = [ (N − k) ln s_p² − Σ (nᵢ − 1) ln sᵢ² ] / [ 1 + (Σ 1/(nᵢ − 1) − 1/(N − k)) / (3(k − 1)) ],
 *   s_p² = SS_within / (N − k),  p = P(χ²_{k−1} ≥ K²).  Gear data: K² = 20.78587 (9 df).
 *
 * Levene (1960) with the group means, and Brown & Forsythe (1974), "Robust tests for the equality
 * of variances", JASA 69, with the group medians (NIST 1.3.5.10): the one-way ANOVA F of
 * zᵢⱼ = |xᵢⱼ − cᵢ|, cᵢ the mean or the median of group i (as car::leveneTest center = mean / median).
 * Gear data: Brown-Forsythe W = 1.7059177, Levene (mean) W = 2.159460, df (9, 90).
 */
import { chisqSf, fSf } from '../distributions/index';
import { MethodInputError } from './errors';
import { computeMoments, quantileSorted, type Sample } from './summary';

export interface GroupStats {
  label: string;
  n: number;
  /** null when only the sd is known (summary data without a mean). */
  mean: number | null;
  variance: number;
}

export interface AnovaTable {
  dfBetween: number;
  dfWithin: number;
  dfTotal: number;
  ssBetween: number;
  ssWithin: number;
  ssTotal: number;
  msBetween: number;
  msWithin: number;
  f: number;
  pValue: number;
  grandMean: number;
}

function checkGroups(groups: readonly { label: string; n: number }[], minGroups: number): void {
  if (groups.length < minGroups) {
    throw new MethodInputError('insufficient-data', 'groups', `needs at least ${minGroups} groups (got ${groups.length})`);
  }
  for (const g of groups) {
    if (g.n < 2) throw new MethodInputError('insufficient-data', 'groups', `group "${g.label}" has ${g.n} value${g.n === 1 ? '' : 's'}; every group needs at least 2`);
  }
}

export function oneWayAnova(groups: readonly GroupStats[]): AnovaTable {
  checkGroups(groups, 2);
  const k = groups.length;
  let total = 0;
  let weighted = 0;
  let wc = 0;
  let ssWithin = 0;
  let cw = 0;
  for (const g of groups) {
    if (g.mean === null) throw new MethodInputError('insufficient-data', 'groups', `group "${g.label}" has no mean; the ANOVA needs the group means`);
    total += g.n;
    const term = g.n * g.mean;
    const t = weighted + term;
    wc += Math.abs(weighted) >= Math.abs(term) ? weighted - t + term : term - t + weighted;
    weighted = t;
    const w = (g.n - 1) * g.variance;
    const u = ssWithin + w;
    cw += ssWithin >= w ? ssWithin - u + w : w - u + ssWithin;
    ssWithin = u;
  }
  ssWithin += cw;
  const grandMean = (weighted + wc) / total;
  let ssBetween = 0;
  let cb = 0;
  for (const g of groups) {
    const d = (g.mean as number) - grandMean;
    const term = g.n * d * d;
    const t = ssBetween + term;
    cb += ssBetween >= term ? ssBetween - t + term : term - t + ssBetween;
    ssBetween = t;
  }
  ssBetween += cb;
  const dfBetween = k - 1;
  const dfWithin = total - k;
  const msBetween = ssBetween / dfBetween;
  const msWithin = ssWithin / dfWithin;
  if (msWithin === 0) throw new MethodInputError('zero-variance', 'groups', 'every group has zero variance; the F ratio is not defined');
  const f = msBetween / msWithin;
  return {
    dfBetween,
    dfWithin,
    dfTotal: total - 1,
    ssBetween,
    ssWithin,
    ssTotal: ssBetween + ssWithin,
    msBetween,
    msWithin,
    f,
    pValue: fSf(f, dfBetween, dfWithin),
    grandMean,
  };
}

export interface BartlettTest {
  statistic: number;
  df: number;
  pValue: number;
  pooledVariance: number;
}

export function bartlettTest(groups: readonly GroupStats[]): BartlettTest {
  checkGroups(groups, 2);
  const k = groups.length;
  let N = 0;
  let ssWithin = 0;
  let sumLog = 0;
  let sumInv = 0;
  for (const g of groups) {
    if (!(g.variance > 0)) throw new MethodInputError('zero-variance', 'groups', `group "${g.label}" has zero variance; Bartlett's test needs every group variance > 0`);
    N += g.n;
    ssWithin += (g.n - 1) * g.variance;
    sumLog += (g.n - 1) * Math.log(g.variance);
    sumInv += 1 / (g.n - 1);
  }
  const pooledVariance = ssWithin / (N - k);
  const numerator = (N - k) * Math.log(pooledVariance) - sumLog;
  const correction = 1 + (sumInv - 1 / (N - k)) / (3 * (k - 1));
  const statistic = numerator / correction;
  return { statistic, df: k - 1, pValue: chisqSf(statistic, k - 1), pooledVariance };
}

export type LeveneCenter = 'mean' | 'median';

export interface LeveneTest {
  center: LeveneCenter;
  statistic: number;
  df1: number;
  df2: number;
  pValue: number;
  anova: AnovaTable;
}

/** Levene (center mean) or Brown-Forsythe (center median) test from the raw groups. */
export function leveneTest(groups: readonly { label: string; sample: Sample }[], center: LeveneCenter): LeveneTest {
  checkGroups(groups.map((g) => ({ label: g.label, n: g.sample.n })), 2);
  const stats: GroupStats[] = groups.map(({ label, sample }) => {
    const c = center === 'mean' ? sample.moments.mean : quantileSorted(sample.sorted(), 0.5);
    const z = new Float64Array(sample.n);
    for (let i = 0; i < z.length; i++) z[i] = Math.abs(sample.values[i] - c);
    const m = computeMoments(z);
    return { label, n: m.n, mean: m.mean, variance: m.variance };
  });
  let anova: AnovaTable;
  try {
    anova = oneWayAnova(stats);
  } catch (e) {
    if (e instanceof MethodInputError && e.code === 'zero-variance') {
      throw new MethodInputError('zero-variance', 'groups', `the absolute deviations from the group ${center}s have zero variance in every group; the ${center === 'mean' ? 'Levene' : 'Brown-Forsythe'} statistic is not defined`);
    }
    throw e;
  }
  return { center, statistic: anova.f, df1: anova.dfBetween, df2: anova.dfWithin, pValue: anova.pValue, anova };
}
