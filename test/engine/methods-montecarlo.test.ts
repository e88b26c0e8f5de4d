// Monte-Carlo coverage of the sigma intervals with the engine's seeded PRNG (methods/random.ts),
// so the run is the same every time. Expectations are common practice for these methods: the
// chi-square interval is exact for normal data and not robust to heavy tails (e.g. NIST e-Handbook
// 1.3.5.8 caution); Bonett (2006) designed his interval to keep its coverage for non-normal data.
import { expect } from 'chai';
import { createRng } from '@shared/engine/methods/random';
import { Sample } from '@shared/engine/methods/summary';
import { bonettBasis, bonettInterval, chiSquareInterval } from '@shared/engine/methods/variance-interval';

const REPLICATES = 20_000;

function coverage(draw: () => number, n: number, trueVariance: number, seed: string): { chi: number; bonett: number } {
  const rng = createRng(seed);
  let chi = 0;
  let bon = 0;
  const x = new Float64Array(n);
  for (let r = 0; r < REPLICATES; r++) {
    for (let i = 0; i < n; i++) x[i] = draw.call(rng);
    const sample = Sample.of(x.slice());
    const c = chiSquareInterval(n, sample.moments.variance, 0.95);
    if (c.varianceLower <= trueVariance && trueVariance <= c.varianceUpper) chi++;
    const b = bonettInterval(bonettBasis(sample), 0.95);
    if (b.varianceLower <= trueVariance && trueVariance <= b.varianceUpper) bon++;
  }
  return { chi: chi / REPLICATES, bonett: bon / REPLICATES };
}

describe('Monte-Carlo coverage of the 95 % sigma intervals (seeded, 20,000 samples of n = 10)', function () {
  this.timeout(60_000);

  it('normal samples: the chi-square interval covers the true sigma² in 95 ± 0.7 % of samples', () => {
    const rng = createRng('coverage-normal');
    const { chi } = coverage(() => rng.normal(), 10, 1, 'unused');
    console.log(`      chi-square coverage on normal data: ${(chi * 100).toFixed(2)} %`);
    expect(Math.abs(chi - 0.95)).to.be.at.most(0.007);
  });

  it('lognormal samples: chi-square coverage falls far below 95 % while Bonett\'s is much closer', () => {
    // Lognormal with sigma_log = 1: Var = (e - 1) e.
    const rng = createRng('coverage-lognormal');
    const trueVariance = (Math.E - 1) * Math.E;
    const { chi, bonett } = coverage(() => Math.exp(rng.normal()), 10, trueVariance, 'unused');
    console.log(`      lognormal data: chi-square ${(chi * 100).toFixed(2)} %, Bonett ${(bonett * 100).toFixed(2)} %`);
    expect(chi, 'chi-square coverage far below 95 %').to.be.below(0.8);
    expect(bonett - chi, 'Bonett much closer to 95 %').to.be.above(0.05);
    expect(Math.abs(bonett - 0.95)).to.be.below(Math.abs(chi - 0.95));
  });

  it('the PRNG is deterministic: the same seed gives the same stream', () => {
    const a = createRng('abc');
    const b = createRng('abc');
    const c = createRng('abd');
    const sa = Array.from({ length: 5 }, () => a.uniform());
    expect(Array.from({ length: 5 }, () => b.uniform())).to.deep.equal(sa);
    expect(Array.from({ length: 5 }, () => c.uniform())).to.not.deep.equal(sa);
    for (const u of sa) expect(u > 0 && u < 1).to.equal(true);
  });
});
