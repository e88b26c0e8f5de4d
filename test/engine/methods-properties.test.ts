// Property tests (fast-check) of the interval methods: facts of the mathematics, no source needed.
import { expect } from 'chai';
import fc from 'fast-check';
import { Sample } from '@shared/engine/methods/summary';
import { bonettBasis, bonettInterval, chiSquareInterval } from '@shared/engine/methods/variance-interval';

// Measurements: decimals on a 0.001 grid, or arbitrary doubles of ordinary magnitude (no subnormals,
// whose variance underflows to zero).
const valueArb = fc.oneof(
  fc.integer({ min: -1_000_000, max: 1_000_000 }).map((i) => i / 1000),
  fc.double({ min: -1e3, max: 1e3, noNaN: true, noDefaultInfinity: true }).filter((x) => x === 0 || Math.abs(x) > 1e-3),
);
const sampleArb = fc
  .array(valueArb, { minLength: 5, maxLength: 60 })
  .filter((xs) => new Set(xs).size > 2);
const levelArb = fc.double({ min: 0.5, max: 0.999, noNaN: true });

describe('properties of the sigma intervals (fast-check)', function () {
  this.timeout(60_000);
  it('the chi-square and Bonett intervals contain s² (two-sided, levels ≥ 0.5)', () => {
    fc.assert(fc.property(sampleArb, levelArb, (xs, level) => {
      const s = Sample.of(xs);
      const v = s.moments.variance;
      const c = chiSquareInterval(s.n, v, level);
      expect(c.varianceLower).to.be.at.most(v);
      expect(c.varianceUpper).to.be.at.least(v);
      const b = bonettInterval(bonettBasis(s), level);
      // Bonett's interval is centred on ln(c s²) with c = n/(n − z) > 1, but z·se ≥ z·sqrt(3)/n > ln c
      // (γ̂₄ ≥ 1), so it contains s² too.
      expect(b.varianceUpper).to.be.at.least(v);
      expect(b.varianceLower).to.be.at.most(v);
    }), { numRuns: 300 });
  });

  it('intervals widen as the confidence level rises', () => {
    fc.assert(fc.property(sampleArb, levelArb, levelArb, (xs, l1, l2) => {
      fc.pre(Math.abs(l1 - l2) > 1e-6);
      const [lo, hi] = l1 < l2 ? [l1, l2] : [l2, l1];
      const s = Sample.of(xs);
      const a = chiSquareInterval(s.n, s.moments.variance, lo);
      const b = chiSquareInterval(s.n, s.moments.variance, hi);
      expect(b.varianceLower).to.be.at.most(a.varianceLower);
      expect(b.varianceUpper).to.be.at.least(a.varianceUpper);
      const basis = bonettBasis(s);
      const ba = bonettInterval(basis, lo);
      const bb = bonettInterval(basis, hi);
      expect(bb.varianceUpper).to.be.at.least(ba.varianceUpper);
      expect(bb.varianceLower).to.be.at.most(ba.varianceLower);
      // one-sided bounds move outward too
      expect(chiSquareInterval(s.n, s.moments.variance, hi, 'upper').varianceUpper).to.be.at.least(chiSquareInterval(s.n, s.moments.variance, lo, 'upper').varianceUpper);
    }), { numRuns: 300 });
  });

  it('under x → a·x + b, sigma limits scale by |a| and variance limits by a² (chi-square and Bonett)', () => {
    const scaleArb = fc.double({ min: 1e-3, max: 1e3, noNaN: true }).chain((m) => fc.constantFrom(m, -m));
    fc.assert(fc.property(sampleArb, scaleArb, fc.double({ min: -1e4, max: 1e4, noNaN: true }), levelArb, (xs, a, b, level) => {
      const s = Sample.of(xs);
      const t = Sample.of(xs.map((x) => a * x + b));
      const rel = (x: number, y: number) => Math.abs(x - y) / Math.abs(y);
      const c1 = chiSquareInterval(s.n, s.moments.variance, level);
      const c2 = chiSquareInterval(t.n, t.moments.variance, level);
      // Rounding of a·x + b limits agreement to the data's own relative precision (shift b against spread).
      const spread = Math.sqrt(s.moments.variance) * Math.abs(a);
      const scale = Math.max(...xs.map((x) => Math.abs(a * x + b)));
      const tol = 1e-12 + 64 * Number.EPSILON * (scale / spread) ** 2;
      expect(rel(c2.sdLower, Math.abs(a) * c1.sdLower)).to.be.below(tol);
      expect(rel(c2.varianceUpper, a * a * c1.varianceUpper)).to.be.below(tol * 2);
      const b1 = bonettInterval(bonettBasis(s), level);
      const b2 = bonettInterval(bonettBasis(t), level);
      expect(rel(b2.sdLower, Math.abs(a) * b1.sdLower)).to.be.below(tol * 16);
      expect(rel(b2.sdUpper, Math.abs(a) * b1.sdUpper)).to.be.below(tol * 16);
    }), { numRuns: 300 });
  });
});
