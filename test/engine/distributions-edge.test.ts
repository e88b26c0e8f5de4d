// Named edge cases of the distribution functions: the behaviour documented in
// shared/engine/distributions/index.ts (exact 0 / 1 / ±Infinity, or a RangeError naming the argument).
import { expect } from 'chai';
import * as D from '@shared/engine/distributions/index';

describe('distributions: edge cases (behaviour documented in distributions/index.ts)', () => {
  describe('quantiles at p = 0 and p = 1 give the ends of the support exactly', () => {
    it('normal, t, noncentral t: −Infinity and +Infinity', () => {
      expect(D.normQuantile(0)).to.equal(-Infinity);
      expect(D.normQuantile(1)).to.equal(Infinity);
      expect(D.normQuantileUpper(0)).to.equal(Infinity);
      expect(D.normQuantileUpper(1)).to.equal(-Infinity);
      expect(D.tQuantile(0, 5)).to.equal(-Infinity);
      expect(D.tQuantile(1, 5)).to.equal(Infinity);
      expect(D.tQuantileUpper(0, 5)).to.equal(Infinity);
      expect(D.tQuantileUpper(1, 5)).to.equal(-Infinity);
      expect(D.nctQuantile(0, 5, 1)).to.equal(-Infinity);
      expect(D.nctQuantile(1, 5, 1)).to.equal(Infinity);
      expect(D.nctQuantileUpper(0, 5, 1)).to.equal(Infinity);
      expect(D.nctQuantileUpper(1, 5, 1)).to.equal(-Infinity);
    });
    it('chi-square and F: 0 and +Infinity', () => {
      expect(D.chisqQuantile(0, 3)).to.equal(0);
      expect(D.chisqQuantile(1, 3)).to.equal(Infinity);
      expect(D.chisqQuantileUpper(0, 3)).to.equal(Infinity);
      expect(D.chisqQuantileUpper(1, 3)).to.equal(0);
      expect(D.fQuantile(0, 3, 4)).to.equal(0);
      expect(D.fQuantile(1, 3, 4)).to.equal(Infinity);
      expect(D.fQuantileUpper(0, 3, 4)).to.equal(Infinity);
      expect(D.fQuantileUpper(1, 3, 4)).to.equal(0);
    });
    it('median of the symmetric ones is exactly 0', () => {
      expect(D.normQuantile(0.5)).to.equal(0);
      expect(D.tQuantile(0.5, 3)).to.equal(0);
      expect(D.tQuantileUpper(0.5, 3)).to.equal(0);
    });
    it('a quantile below the smallest double is 0, as in R (qchisq(1e-300, 1) = 0)', () => {
      expect(D.chisqQuantile(1e-300, 1)).to.equal(0);
      expect(D.fQuantile(1e-300, 1, 10)).to.equal(0);
    });
  });

  describe('probabilities outside [0, 1] or NaN throw a RangeError naming the argument', () => {
    const bad = [-0.1, 1.5, NaN, -Infinity, Infinity];
    for (const p of bad) {
      it(`p = ${p}`, () => {
        expect(() => D.normQuantile(p)).to.throw(RangeError, /normQuantile: p must be in \[0, 1\]/);
        expect(() => D.normQuantileUpper(p)).to.throw(RangeError, /normQuantileUpper: q must be/);
        expect(() => D.chisqQuantile(p, 2)).to.throw(RangeError, /chisqQuantile: p/);
        expect(() => D.chisqQuantileUpper(p, 2)).to.throw(RangeError, /chisqQuantileUpper: q/);
        expect(() => D.fQuantile(p, 2, 3)).to.throw(RangeError, /fQuantile: p/);
        expect(() => D.fQuantileUpper(p, 2, 3)).to.throw(RangeError, /fQuantileUpper: q/);
        expect(() => D.tQuantile(p, 2)).to.throw(RangeError, /tQuantile: p/);
        expect(() => D.tQuantileUpper(p, 2)).to.throw(RangeError, /tQuantileUpper: q/);
        expect(() => D.nctQuantile(p, 2, 1)).to.throw(RangeError, /nctQuantile: p/);
        expect(() => D.nctQuantileUpper(p, 2, 1)).to.throw(RangeError, /nctQuantileUpper: q/);
      });
    }
  });

  describe('degrees of freedom ≤ 0, NaN or infinite throw a RangeError naming the argument', () => {
    for (const df of [0, -1, NaN, Infinity]) {
      it(`df = ${df}`, () => {
        expect(() => D.chisqCdf(1, df)).to.throw(RangeError, /chisqCdf: df must be a finite number > 0/);
        expect(() => D.chisqSf(1, df)).to.throw(RangeError, /chisqSf: df/);
        expect(() => D.chisqPdf(1, df)).to.throw(RangeError, /chisqPdf: df/);
        expect(() => D.chisqQuantile(0.5, df)).to.throw(RangeError, /chisqQuantile: df/);
        expect(() => D.tCdf(1, df)).to.throw(RangeError, /tCdf: df/);
        expect(() => D.tQuantileUpper(0.1, df)).to.throw(RangeError, /tQuantileUpper: df/);
        expect(() => D.fCdf(1, df, 3)).to.throw(RangeError, /fCdf: d1/);
        expect(() => D.fSf(1, 3, df)).to.throw(RangeError, /fSf: d2/);
        expect(() => D.fQuantile(0.5, 3, df)).to.throw(RangeError, /fQuantile: d2/);
        expect(() => D.nctCdf(1, df, 1)).to.throw(RangeError, /nctCdf: df/);
      });
    }
    it('a non-finite noncentrality throws', () => {
      expect(() => D.nctCdf(1, 3, NaN)).to.throw(RangeError, /nctCdf: ncp must be a finite number/);
      expect(() => D.nctQuantile(0.5, 3, Infinity)).to.throw(RangeError, /nctQuantile: ncp/);
    });
  });

  describe('x at 0, negative, ±Infinity or NaN', () => {
    it('x = NaN throws', () => {
      expect(() => D.normCdf(NaN)).to.throw(RangeError, /normCdf: x must be a number/);
      expect(() => D.chisqSf(NaN, 3)).to.throw(RangeError, /chisqSf: x/);
      expect(() => D.fPdf(NaN, 3, 3)).to.throw(RangeError, /fPdf: x/);
      expect(() => D.tSf(NaN, 3)).to.throw(RangeError, /tSf: x/);
      expect(() => D.nctSf(NaN, 3, 1)).to.throw(RangeError, /nctSf: x/);
    });
    it('±Infinity give exact 0 and 1, densities 0', () => {
      expect(D.normCdf(-Infinity)).to.equal(0);
      expect(D.normCdf(Infinity)).to.equal(1);
      expect(D.normSf(Infinity)).to.equal(0);
      expect(D.normSf(-Infinity)).to.equal(1);
      expect(D.normPdf(Infinity)).to.equal(0);
      expect(D.tCdf(-Infinity, 4)).to.equal(0);
      expect(D.tSf(-Infinity, 4)).to.equal(1);
      expect(D.tPdf(Infinity, 4)).to.equal(0);
      expect(D.chisqCdf(Infinity, 4)).to.equal(1);
      expect(D.chisqSf(Infinity, 4)).to.equal(0);
      expect(D.chisqPdf(Infinity, 4)).to.equal(0);
      expect(D.fCdf(Infinity, 4, 5)).to.equal(1);
      expect(D.fSf(Infinity, 4, 5)).to.equal(0);
      expect(D.nctCdf(Infinity, 4, 2)).to.equal(1);
      expect(D.nctSf(-Infinity, 4, 2)).to.equal(1);
    });
    it('chi-square and F: x < 0 is outside the support (cdf 0, sf 1, pdf 0)', () => {
      expect(D.chisqCdf(-1, 3)).to.equal(0);
      expect(D.chisqSf(-1, 3)).to.equal(1);
      expect(D.chisqPdf(-1, 3)).to.equal(0);
      expect(D.fCdf(-2, 3, 4)).to.equal(0);
      expect(D.fSf(-2, 3, 4)).to.equal(1);
      expect(D.fPdf(-2, 3, 4)).to.equal(0);
    });
    it('x = 0: cdf 0 and sf 1 exactly; the pdf is Infinity, the limit or 0 by shape', () => {
      expect(D.chisqCdf(0, 3)).to.equal(0);
      expect(D.chisqSf(0, 3)).to.equal(1);
      expect(D.chisqPdf(0, 1)).to.equal(Infinity);
      expect(D.chisqPdf(0, 2)).to.equal(0.5);
      expect(D.chisqPdf(0, 3)).to.equal(0);
      expect(D.fCdf(0, 3, 4)).to.equal(0);
      expect(D.fSf(0, 3, 4)).to.equal(1);
      expect(D.fPdf(0, 1, 4)).to.equal(Infinity);
      expect(D.fPdf(0, 2, 4)).to.equal(1);
      expect(D.fPdf(0, 3, 4)).to.equal(0);
      expect(D.tCdf(0, 7)).to.equal(0.5);
      expect(D.tSf(0, 7)).to.equal(0.5);
      expect(D.normCdf(0)).to.equal(0.5);
      // noncentral t at 0 is Φ(−ncp); Φ(−1.5) = 0.0668072012688581 (R: pnorm(-1.5))
      expect(Math.abs(D.nctCdf(0, 5, 1.5) / 0.0668072012688581 - 1)).to.be.lessThan(1e-15);
    });
    it('noncentral t with ncp = 0 is the central t (within 64 eps)', () => {
      for (const [x, df] of [[-3, 2], [0.7, 5], [2.5, 30], [-10, 1]]) {
        expect(Math.abs(D.nctCdf(x, df, 0) / D.tCdf(x, df) - 1)).to.be.lessThan(64 * Number.EPSILON);
        expect(Math.abs(D.nctSf(x, df, 0) / D.tSf(x, df) - 1)).to.be.lessThan(64 * Number.EPSILON);
      }
    });
  });

  describe('upper tails are computed directly, not as 1 − cdf', () => {
    it('far upper tails stay positive and accurate where 1 − cdf would be 0', () => {
      // values from R 4.2.2: pnorm(40, lower=FALSE) underflows to 0 in double; pnorm(30, lower=FALSE)
      expect(D.normSf(30)).to.be.closeTo(4.906713927148187e-198, 8 * Number.EPSILON * 4.906713927148187e-198);
      expect(D.chisqSf(1000, 10)).to.be.greaterThan(1e-210);
      expect(1 - D.chisqCdf(1000, 10)).to.equal(0);
      expect(D.tSf(1e10, 3)).to.be.greaterThan(0);
      expect(D.fSf(1e6, 5, 5)).to.be.greaterThan(0);
    });
  });
});
