// The bulk normal tail used by Anderson-Darling (shared/engine/distributions/normal.ts,
// normalUpperBulk) against the full-accuracy tail normalUpper, which the distribution suites check
// against R's pnorm and mpmath (test/fixtures). The stated bound is the rounding of x² in one
// exponential: relative error ≤ (x²/4 + 4)·eps.
import { expect } from 'chai';
import { normalUpper, normalUpperBulk } from '@shared/engine/distributions/normal';

const EPS = Number.EPSILON;

describe('distributions: the bulk normal tail of Anderson-Darling', () => {
  it('stays within (x²/4 + 4) eps of the full-accuracy tail from 0 to 37 (results above the subnormal range)', () => {
    let worst = 0;
    let worstX = 0;
    for (let k = 0; k <= 370_000; k++) {
      const x = k * 1e-4 + (k % 7) * 1.3e-6;
      const exact = normalUpper(x);
      const rel = Math.abs(normalUpperBulk(x) - exact) / exact / ((x * x) / 4 + 4);
      if (rel > worst) {
        worst = rel;
        worstX = x;
      }
    }
    expect(worst / EPS, `worst at x = ${worstX}`).to.be.at.most(1);
  });

  it('is the same function as the full tail in the central range, where no exponential is taken', () => {
    for (let x = 0; x <= 0.66; x += 0.0013) expect(normalUpperBulk(x)).to.equal(normalUpper(x));
  });
});
