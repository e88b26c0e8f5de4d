// Every worked example of ../shared/REFERENCES.md, each check naming its source.
import { expect } from 'chai';
import { Sample, spreadSummary } from '@shared/engine/methods/summary';
import { bonettBasis, bonettInterval, chiSquareInterval } from '@shared/engine/methods/variance-interval';
import { chiSquareVarianceTest } from '@shared/engine/methods/target-test';
import { varianceRatioTest } from '@shared/engine/methods/ratio';
import { bartlettTest, leveneTest, type GroupStats } from '@shared/engine/methods/groups';
import { andersonDarlingPValue, shapiroWilk } from '@shared/engine/methods/normality';
import {
  chiSquarePowerDf, sampleSizeForChiSquarePower, sampleSizeForRelativePrecision,
} from '@shared/engine/methods/sample-size';
import {
  capability, toleranceFactorExact, toleranceFactorHowe, toleranceFactorOneSided, toleranceFactorOneSidedNatrella,
} from '@shared/engine/methods/capability';
import { expectEps, expectPrinted, expectRel, GEAR_ABSENT, groupBy, readGearData } from './support/check';

const gear = readGearData();

function gearSample(): Sample {
  return Sample.of(gear!.diameter);
}
function gearGroups(): { label: string; sample: Sample }[] {
  return [...groupBy(gear!.diameter, gear!.batch)].map(([label, v]) => ({ label, sample: Sample.of(v) }));
}

describe('REFERENCES.md: NIST StRD univariate summary statistics (certified values)', () => {
  const numAcc = (first: number, a: number, b: number) => [first, ...Array.from({ length: 500 }, () => [a, b]).flat()];
  const cases: [string, number[], number, number][] = [
    ['NumAcc1', [10000001, 10000003, 10000002], 10000002, 1],
    ['NumAcc2', numAcc(1.2, 1.1, 1.3), 1.2, 0.1],
    ['NumAcc3', numAcc(1000000.2, 1000000.1, 1000000.3), 1000000.2, 0.1],
    ['NumAcc4', numAcc(10000000.2, 10000000.1, 10000000.3), 10000000.2, 0.1],
  ];
  for (const [name, data, mean, sd] of cases) {
    it(`${name}: certified mean and sd to 1e-13 relative (NIST StRD)`, () => {
      const s = spreadSummary(Sample.of(data));
      expect(s.n).to.equal(data.length);
      expectRel(s.mean, mean, 1e-15, `${name} mean`);
      expectRel(s.sd, sd, 1e-13, `${name} sd`);
      // achieved: within a few ulp
      expectEps(s.sd, sd, 4, `${name} sd (4 eps)`);
    });
  }
  it('NumAcc4 shifted off the decimal grid still meets 1e-13 with the compensated two-pass route', () => {
    // Adding 2^-40 makes the values non-short decimals, forcing the floating-point route; the certified
    // sd is unchanged by a shift, and the representation error of the inputs limits accuracy to ~1e-8.
    const data = numAcc(1.2, 1.1, 1.3).map((v) => v + 2 ** -40);
    const s = spreadSummary(Sample.of(data));
    expect(s.route).to.equal('compensated-two-pass');
    expectRel(s.sd, 0.1, 1e-13, 'NumAcc2 + 2^-40 sd');
  });
});

describe('REFERENCES.md: NIST/SEMATECH e-Handbook 1.3.5.8 chi-square test for the sd (gear data)', function () {
  before(function () {
    if (!gear) { console.log(`      ${GEAR_ABSENT}`); this.skip(); }
  });
  it('n = 100, s = 0.006278905 (R from the file), T = 0.390304, df 99, H0 sigma = 0.1 rejected', () => {
    const s = gearSample();
    expect(s.n).to.equal(100);
    expectPrinted(s.moments.sd, '0.006278905', 'sd (R)');
    // The handbook prints 0.006278908; the file gives 0.006278905 (as R): agree to 1e-6 relative.
    expectRel(s.moments.sd, 0.006278908, 1e-6, 'sd (handbook printed)');
    const twoSided = chiSquareVarianceTest(100, s.moments.variance, 0.1, 'two-sided', 0.05);
    expectPrinted(twoSided.statistic, '0.390304', 'T');
    expect(twoSided.df).to.equal(99);
    expectPrinted(twoSided.criticalLower!, '73.361', 'lower critical, alpha/2 = 0.025');
    expectPrinted(twoSided.criticalUpper!, '128.422', 'upper critical, alpha/2 = 0.025');
    expect(twoSided.rejectH0).to.equal(true);
    expectPrinted(chiSquareVarianceTest(100, s.moments.variance, 0.1, 'less', 0.05).criticalLower!, '77.046', 'lower critical, alpha = 0.05');
    expectPrinted(chiSquareVarianceTest(100, s.moments.variance, 0.1, 'greater', 0.05).criticalUpper!, '123.225', 'upper critical, alpha = 0.05');
  });
  it('confidence limits for sigma: 90 % 0.00563–0.00712, 95 % 0.005513–0.007294, 99 % 0.00530–0.00766', () => {
    const v = gearSample().moments.variance;
    const at = (level: number) => chiSquareInterval(100, v, level);
    expectPrinted(at(0.9).sdLower, '0.00563', '90 % lower');
    expectPrinted(at(0.9).sdUpper, '0.00712', '90 % upper');
    expectPrinted(at(0.95).sdLower, '0.005513', '95 % lower (computed)');
    expectPrinted(at(0.95).sdUpper, '0.007294', '95 % upper (computed)');
    expectPrinted(at(0.99).sdLower, '0.00530', '99 % lower');
    expectPrinted(at(0.99).sdUpper, '0.00766', '99 % upper');
  });
});

describe('REFERENCES.md: NIST/SEMATECH e-Handbook 7.2.3 (silicon wafers, summary statistics)', () => {
  it('n = 10, s = 13.97, sigma0 = 10: T = 17.56448, critical values, sigma > 10 accepted, p = 0.04058', () => {
    const greater = chiSquareVarianceTest(10, 13.97 ** 2, 10, 'greater', 0.05);
    expectPrinted(greater.statistic, '17.56448', 'T');
    expectPrinted(greater.criticalUpper!, '16.919', 'upper critical alpha = 0.05');
    expect(greater.rejectH0).to.equal(true);
    expectPrinted(greater.pValue, '0.04058', 'upper-tail p (computed)');
    const two = chiSquareVarianceTest(10, 13.97 ** 2, 10, 'two-sided', 0.05);
    expectPrinted(two.criticalUpper!, '19.023', 'upper critical alpha/2');
    expectPrinted(two.criticalLower!, '2.700', 'lower critical alpha/2');
    expectPrinted(chiSquareVarianceTest(10, 13.97 ** 2, 10, 'less', 0.05).criticalLower!, '3.325', 'lower critical alpha');
  });
  it('chi-square table 1.3.6.7.4 through the test critical values: chi2(0.95,10) = 18.307, chi2(0.05,10) = 3.940, chi2(0.95,30) = 43.773', () => {
    expectPrinted(chiSquareVarianceTest(11, 1, 1, 'greater', 0.05).criticalUpper!, '18.307', 'chi2(0.95, 10)');
    expectPrinted(chiSquareVarianceTest(11, 1, 1, 'less', 0.05).criticalLower!, '3.940', 'chi2(0.05, 10)');
    expectPrinted(chiSquareVarianceTest(11, 1, 1, 'greater', 0.01).criticalUpper!, '23.209', 'chi2(0.99, 10)');
    expectPrinted(chiSquareVarianceTest(31, 1, 1, 'greater', 0.05).criticalUpper!, '43.773', 'chi2(0.95, 30)');
    expectPrinted(chiSquareVarianceTest(21, 1, 1, 'greater', 0.01).criticalUpper!, '37.566', 'chi2(0.99, 20)');
  });
});

describe('REFERENCES.md: NIST/SEMATECH e-Handbook 1.3.5.9 and 7.3.2, F test of two variances', () => {
  it('1.3.5.9 JAHANMI2: F = 1.123037, p = 0.370383, CI 0.870987–1.448027 (sd 0.933267–1.203340), critical 0.7756 / 1.2894, not rejected', () => {
    const r = varianceRatioTest(240, 65.54909 ** 2, 240, 61.85425 ** 2);
    expectPrinted(r.statistic, '1.123037', 'F');
    expect(r.df1).to.equal(239);
    expectPrinted(r.pValue, '0.370383', 'two-sided p (computed)');
    expectPrinted(r.ratioLower, '0.870987', 'ratio lower');
    expectPrinted(r.ratioUpper, '1.448027', 'ratio upper');
    expectPrinted(r.sdRatioLower, '0.933267', 'sd ratio lower');
    expectPrinted(r.sdRatioUpper, '1.203340', 'sd ratio upper');
    expectPrinted(r.criticalLower!, '0.7756', 'lower critical');
    expectPrinted(r.criticalUpper!, '1.2894', 'upper critical');
    expect(r.rejectH0).to.equal(false);
  });
  it('7.3.2: s1 = 4.9082 (n 11), s2 = 2.5874 (n 9): F = 3.59847, critical 3.347 / 4.295 / 0.3256 / 0.2594, one-sided rejects', () => {
    const greater = varianceRatioTest(11, 4.9082 ** 2, 9, 2.5874 ** 2, { alternative: 'greater' });
    expectPrinted(greater.statistic, '3.59847', 'F');
    expectPrinted(greater.criticalUpper!, '3.347', 'upper critical alpha');
    expect(greater.rejectH0).to.equal(true);
    const two = varianceRatioTest(11, 4.9082 ** 2, 9, 2.5874 ** 2);
    expectPrinted(two.criticalUpper!, '4.295', 'upper critical alpha/2');
    expectPrinted(two.criticalLower!, '0.2594', 'lower critical alpha/2');
    expectPrinted(varianceRatioTest(11, 4.9082 ** 2, 9, 2.5874 ** 2, { alternative: 'less' }).criticalLower!, '0.3256', 'lower critical alpha');
  });
  it('F table 1.3.6.7.2 through the test critical values: F(0.95; 2, 20) = 3.493, F(0.95; 10, 10) = 2.978, F(0.95; 1, 10) = 4.965', () => {
    const crit = (d1: number, d2: number) => varianceRatioTest(d1 + 1, 1, d2 + 1, 1, { alternative: 'greater' }).criticalUpper!;
    expectPrinted(crit(2, 20), '3.493', 'F(0.95; 2, 20)');
    expectPrinted(crit(3, 30), '2.922', 'F(0.95; 3, 30)');
    expectPrinted(crit(10, 10), '2.978', 'F(0.95; 10, 10)');
    expectPrinted(crit(4, 15), '3.056', 'F(0.95; 4, 15)');
    expectPrinted(crit(1, 10), '4.965', 'F(0.95; 1, 10)');
    expectPrinted(crit(5, 10), '3.326', 'F(0.95; 5, 10)');
  });
});

describe('REFERENCES.md: NIST/SEMATECH e-Handbook 1.3.5.7 Bartlett and 1.3.5.10 Levene (gear data)', function () {
  before(function () {
    if (!gear) { console.log(`      ${GEAR_ABSENT}`); this.skip(); }
  });
  it('Bartlett: T = 20.78587 (computed; printed 20.78580 within 1e-4), df 9, critical 16.919, rejected, p = 0.0136359', () => {
    const stats: GroupStats[] = gearGroups().map(({ label, sample }) => ({ label, n: sample.n, mean: sample.moments.mean, variance: sample.moments.variance }));
    const b = bartlettTest(stats);
    expectPrinted(b.statistic, '20.78587', 'T (computed)');
    expect(Math.abs(b.statistic - 20.7858)).to.be.below(1e-4);
    expect(b.df).to.equal(9);
    expect(b.statistic > 16.919).to.equal(true);
    expectPrinted(b.pValue, '0.0136359', 'p (computed)');
  });
  it('Brown-Forsythe (median): W = 1.7059177 (printed 1.705910), df (9, 90), not rejected at critical 1.9855, p = 0.099083', () => {
    const w = leveneTest(gearGroups(), 'median');
    expectPrinted(w.statistic, '1.7059177', 'W (computed)');
    expect(Math.abs(w.statistic - 1.70591)).to.be.below(1e-5);
    expect([w.df1, w.df2]).to.deep.equal([9, 90]);
    expect(w.statistic < 1.9855).to.equal(true);
    expectPrinted(w.pValue, '0.099083', 'p (computed)');
  });
  it('Levene (mean): W = 2.159460, p = 0.032237 (computed)', () => {
    const w = leveneTest(gearGroups(), 'mean');
    expectPrinted(w.statistic, '2.159460', 'W');
    expectPrinted(w.pValue, '0.032237', 'p');
  });
});

describe('REFERENCES.md: NIST/SEMATECH e-Handbook 1.3.5.14 Anderson-Darling', () => {
  it('the p-value of the adjusted A* at the published 5 % critical value 0.752 is 0.05 (to the table\'s rounding)', () => {
    expect(Math.abs(andersonDarlingPValue(0.752) - 0.05)).to.be.below(5e-4);
    expect(andersonDarlingPValue(0.76)).to.be.below(0.05);
    expect(andersonDarlingPValue(0.74)).to.be.above(0.05);
  });
});

describe('REFERENCES.md: NIST/SEMATECH e-Handbook 6.1.6 process capability', () => {
  it('USL 20, LSL 8, mean 16, s 2 → Cp 1.0, Cpk 0.6667, Cpu 0.6667, Cpl 1.3333', () => {
    const c = capability({ n: 50, mean: 16, sd: 2, lsl: 8, usl: 20, level: 0.95 });
    expectEps(c.cp!, 1, 2, 'Cp');
    expectPrinted(c.cpk!, '0.6667', 'Cpk');
    expectPrinted(c.cpu!, '0.6667', 'Cpu');
    expectPrinted(c.cpl!, '1.3333', 'Cpl');
  });
  it('Quality Digest (May 2000): Cpk = 1.15, n = 45 → 95 % interval 0.89–1.41 (computed 0.8907–1.4093, Bissell 1990)', () => {
    // Cpk = 1.15 from mean 0, sd 1, USL 3.45 with a distant LSL.
    const c = capability({ n: 45, mean: 0, sd: 1, lsl: -100, usl: 3.45, level: 0.95 });
    expectEps(c.cpk!, 1.15, 4, 'Cpk');
    expectPrinted(c.cpkLower!, '0.8907', 'Cpk lower');
    expectPrinted(c.cpkUpper!, '1.4093', 'Cpk upper');
  });
  it('Montgomery (from memory): USL 62, LSL 38, n = 20, s = 1.75 → Cp 2.29, 95 % 1.57–3.01 (computed 1.5649–3.0056)', () => {
    const c = capability({ n: 20, mean: 50, sd: 1.75, lsl: 38, usl: 62, level: 0.95 });
    expectPrinted(c.cp!, '2.29', 'Cp');
    expectPrinted(c.cpLower!, '1.5649', 'Cp lower');
    expectPrinted(c.cpUpper!, '3.0056', 'Cp upper');
  });
});

describe('REFERENCES.md: NIST/SEMATECH e-Handbook 7.2.6.3 normal tolerance intervals', function () {
  this.timeout(30_000);
  it('n = 43, p = 0.90, confidence 0.99: Howe k2 = 2.2173, exact k2 = 2.2228 (computed)', () => {
    expectPrinted(toleranceFactorHowe(43, 0.9, 0.99), '2.2173', 'Howe k2');
    expectPrinted(toleranceFactorExact(43, 0.9, 0.99), '2.2228', 'exact k2');
  });
  it('one-sided k1: 1.8752 (Natrella approximation); n = 6: 5.2808 (Natrella)', () => {
    expectPrinted(toleranceFactorOneSidedNatrella(43, 0.9, 0.99), '1.8752', 'Natrella n = 43');
    expectPrinted(toleranceFactorOneSidedNatrella(6, 0.9, 0.99), '5.2808', 'Natrella n = 6');
  });
  it('one-sided k1 through the noncentral t: 1.8740 (n = 43), 4.4111 (n = 6)', () => {
    expectPrinted(toleranceFactorOneSided(43, 0.9, 0.99), '1.8740', 'noncentral t n = 43');
    expectPrinted(toleranceFactorOneSided(6, 0.9, 0.99), '4.4111', 'noncentral t n = 6');
  });
});

describe('REFERENCES.md: NIST/SEMATECH e-Handbook 7.2.3.2 sample size for the chi-square test', () => {
  it('variance 100 against 155, alpha 0.05, beta 0.01 → 169.33 df unrounded, 170 df', () => {
    const df = chiSquarePowerDf(0.05, Math.sqrt(1.55), 'greater', 0.99);
    expectPrinted(df, '169.33', 'continuous df');
    const n = sampleSizeForChiSquarePower(0.05, Math.sqrt(1.55), 'greater', 0.99);
    expect(n - 1).to.equal(170);
  });
});

describe('REFERENCES.md: rules of thumb for the chi-square multipliers (common practice, no source)', () => {
  it('95 %: about 0.49–3.08 at 10 df, 0.61–1.94 at 24, 0.77–1.35 at 99', () => {
    for (const [df, lo, hi] of [[10, '0.49', '3.08'], [24, '0.61', '1.94'], [99, '0.77', '1.35']] as const) {
      const ci = chiSquareInterval(df + 1, 1, 0.95);
      expectPrinted(ci.varianceLower, lo, `lower multiplier at ${df} df`);
      expectPrinted(ci.varianceUpper, hi, `upper multiplier at ${df} df`);
    }
  });
});

describe('REFERENCES.md: other published examples', () => {
  it('Shapiro & Wilk (1965) weights of 11 men: W = 0.78881, p = 0.006704 (R shapiro.test, AS R94)', () => {
    const x = Float64Array.from([148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236]);
    const sw = shapiroWilk(x);
    expectPrinted(sw.statistic, '0.78881', 'W');
    expectPrinted(sw.pValue, '0.006704', 'p');
  });
  it('Bonett (2006), gear data at 95 %, floor rounding: g4 = 4.420089, c = 1.019991, sigma² in (2.768761e-05, 5.840409e-05), sigma in (0.005262, 0.007642)', function () {
    if (!gear) { console.log(`      ${GEAR_ABSENT}`); this.skip(); }
    const b = bonettInterval(bonettBasis(gearSample()), 0.95);
    expectPrinted(b.kurtosis, '4.420089', 'g4');
    expectPrinted(b.c, '1.019991', 'c');
    expectPrinted(b.varianceLower, '2.768761e-05', 'variance lower');
    expectPrinted(b.varianceUpper, '5.840409e-05', 'variance upper');
    expectPrinted(b.sdLower, '0.005262', 'sd lower');
    expectPrinted(b.sdUpper, '0.007642', 'sd upper');
    expect(b.trimmedCount).to.equal(Math.floor(100 / (2 * Math.sqrt(96))));
  });
  it('sample size for ± d % on sigma at 95 %: Greenwood & Sandomire table and the exact criterion (computed)', () => {
    const ds = [1, 5, 10, 20, 30, 40, 50];
    const exact = ds.map((d) => sampleSizeForRelativePrecision(0.95, d, 'exact'));
    expect(exact, 'exact criterion P(|s/sigma - 1| < d) >= 0.95').to.deep.equal([19208, 769, 193, 49, 23, 13, 9]);
    const gs = ds.map((d) => sampleSizeForRelativePrecision(0.95, d, 'greenwood-sandomire'));
    // Table: 19205, 768, 192, 48, 21, 12, 8. The normal-approximation formula reproduces all but the
    // 1 % entry exactly; that one it gives as 19207 (0.01 % from the printed 19205).
    expect(gs.slice(1)).to.deep.equal([768, 192, 48, 21, 12, 8]);
    expect(Math.abs(gs[0] - 19205) / 19205).to.be.below(2e-4);
  });
});
