// Public API of the distribution functions used by every method of the engine.
// Provisional implementation on jstat; the distributions module replaces the internals with
// routines accurate to 1e-12 relative against R. Signatures here are the contract.
import jStat from 'jstat';

const j = (jStat as unknown as { jStat?: typeof jStat }).jStat ?? jStat;

export const normPdf = (x: number): number => j.normal.pdf(x, 0, 1);
export const normCdf = (x: number): number => j.normal.cdf(x, 0, 1);
export const normSf = (x: number): number => j.normal.cdf(-x, 0, 1);
export const normQuantile = (p: number): number => j.normal.inv(p, 0, 1);
export const normQuantileUpper = (q: number): number => -j.normal.inv(q, 0, 1);

export const chisqPdf = (x: number, df: number): number => j.chisquare.pdf(x, df);
export const chisqCdf = (x: number, df: number): number => j.chisquare.cdf(x, df);
export const chisqSf = (x: number, df: number): number => 1 - j.chisquare.cdf(x, df);
export const chisqQuantile = (p: number, df: number): number => j.chisquare.inv(p, df);
export const chisqQuantileUpper = (q: number, df: number): number => j.chisquare.inv(1 - q, df);

export const fPdf = (x: number, d1: number, d2: number): number => j.centralF.pdf(x, d1, d2);
export const fCdf = (x: number, d1: number, d2: number): number => j.centralF.cdf(x, d1, d2);
export const fSf = (x: number, d1: number, d2: number): number => 1 - j.centralF.cdf(x, d1, d2);
export const fQuantile = (p: number, d1: number, d2: number): number => j.centralF.inv(p, d1, d2);
export const fQuantileUpper = (q: number, d1: number, d2: number): number => j.centralF.inv(1 - q, d1, d2);

export const tPdf = (x: number, df: number): number => j.studentt.pdf(x, df);
export const tCdf = (x: number, df: number): number => j.studentt.cdf(x, df);
export const tSf = (x: number, df: number): number => j.studentt.cdf(-x, df);
export const tQuantile = (p: number, df: number): number => j.studentt.inv(p, df);
export const tQuantileUpper = (q: number, df: number): number => -j.studentt.inv(q, df);

/** Noncentral t with noncentrality ncp. Provisional: not implemented until the distributions module lands. */
export function nctCdf(_x: number, _df: number, _ncp: number): number {
  throw new Error('nctCdf: not implemented yet');
}
export function nctSf(x: number, df: number, ncp: number): number {
  return 1 - nctCdf(x, df, ncp);
}
export function nctQuantile(_p: number, _df: number, _ncp: number): number {
  throw new Error('nctQuantile: not implemented yet');
}
