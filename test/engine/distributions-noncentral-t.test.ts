// Noncentral t against 30-digit quadrature values (test/fixtures/mpmath/noncentral_t.py →
// noncentral-t.json) and against R's pt(ncp=)/qt(ncp=) (test/fixtures/r/distributions.R) with a
// tolerance stated for R's own limits: R follows AS 243 (Lenth 1989) with an absolute error bound
// of 1e-12 and forms upper tails as 1 − lower, so it is compared only where its value is ≥ 1e-3,
// at 1e-9 relative (1e-12 absolute at 1e-3; cdf, sf) and 5e-9 (quantiles, whose upper tail R solves as 1 − lower).
import { expect } from 'chai';
import * as D from '@shared/engine/distributions/index';
import { checkAgainst, loadFixture, report } from './distributions-check';

const M = loadFixture('mpmath/noncentral-t.json');
const R = loadFixture('r/distributions.json').nct;

function run(label: string, inputs: Record<string, number[]>, expected: number[], fn: (...a: number[]) => number, N: number, include?: (i: number) => boolean): void {
  const r = checkAgainst(label, inputs, expected, fn, N, include);
  console.log(`      ${report(r, label, N).split('\n')[0]}`);
  expect(r.failures, report(r, label, N)).to.have.length(0);
  expect(r.count).to.be.greaterThan(0);
}

describe('noncentral t (df 1 to 100, ncp −10 to 35)', function () {
  this.timeout(60000);
  it('cdf and sf within 256 eps of 30-digit values, both tails down to 1e-300', () => {
    const big = (b: any) => (i: number) => Math.abs(b.expected[i]) >= 1e-300;
    run('nctCdf', { x: M.cdf.x, df: M.cdf.df, ncp: M.cdf.ncp }, M.cdf.expected, D.nctCdf, 256, big(M.cdf));
    run('nctSf', { x: M.sf.x, df: M.sf.df, ncp: M.sf.ncp }, M.sf.expected, D.nctSf, 256, big(M.sf));
  });
  it('quantiles within 128 eps of 30-digit values', () => {
    // the reference solver leaves ~1e-31 instead of an exact 0 at p = ½, ncp = 0: those points are skipped
    const nz = (b: any) => (i: number) => Math.abs(b.expected[i]) > 1e-20;
    run('nctQuantile', { p: M.quantile.p, df: M.quantile.df, ncp: M.quantile.ncp }, M.quantile.expected, D.nctQuantile, 128, nz(M.quantile));
    run('nctQuantileUpper', { q: M.quantileUpper.q, df: M.quantileUpper.df, ncp: M.quantileUpper.ncp }, M.quantileUpper.expected, D.nctQuantileUpper, 128, nz(M.quantileUpper));
  });
  it("agrees with R's pt(ncp=) where R's value is ≥ 1e-3 (1e-9 relative, R's AS 243 bound of 1e-12 absolute)", () => {
    const N = 1e-9 / Number.EPSILON;
    run('nctCdf', { x: R.cdf.x, df: R.cdf.df, ncp: R.cdf.ncp }, R.cdf.expected, D.nctCdf, N, (i) => R.cdf.expected[i] >= 1e-3);
    run('nctSf', { x: R.sf.x, df: R.sf.df, ncp: R.sf.ncp }, R.sf.expected, D.nctSf, N, (i) => R.sf.expected[i] >= 1e-3);
  });
  it("agrees with R's qt(ncp=) to 5e-9 relative (R's upper quantile solves 1 − lower)", () => {
    const N = 5e-9 / Number.EPSILON;
    const nz = (b: any) => (i: number) => Math.abs(b.expected[i]) > 1e-12;
    const sub = (b: any) => (i: number) => nz(b)(i) && i % 3 === 0; // every third point keeps the run short
    run('nctQuantile', { p: R.quantile.p, df: R.quantile.df, ncp: R.quantile.ncp }, R.quantile.expected, D.nctQuantile, N, sub(R.quantile));
    run('nctQuantileUpper', { q: R.quantileUpper.q, df: R.quantileUpper.df, ncp: R.quantileUpper.ncp }, R.quantileUpper.expected, D.nctQuantileUpper, N, sub(R.quantileUpper));
  });
  it('cdf(quantile(p)) returns p within 1e-13 relative', () => {
    for (const [p, df, ncp] of [[0.01, 5, 3], [0.95, 42, 8.4], [0.999, 10, 20], [1e-6, 2, 0.5]]) {
      const x = D.nctQuantile(p, df, ncp);
      expect(Math.abs(D.nctCdf(x, df, ncp) / p - 1), `p=${p} df=${df} ncp=${ncp} x=${x}`).to.be.lessThan(1e-13);
    }
  });
});
