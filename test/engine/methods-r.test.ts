// The engine's methods against R (fixtures from test/fixtures/r/methods.R; this test reads only the
// JSON). Tolerances are relative, in multiples of Number.EPSILON, stated per function (about 2-4
// times the worst error seen, printed at the end of the run).
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import { Sample, spreadSummary } from '@shared/engine/methods/summary';
import { bonettBasis, bonettInterval, chiSquareInterval, type Sides } from '@shared/engine/methods/variance-interval';
import { chiSquareVarianceTest } from '@shared/engine/methods/target-test';
import { varianceRatioTest } from '@shared/engine/methods/ratio';
import { bartlettTest, leveneTest, oneWayAnova } from '@shared/engine/methods/groups';
import { andersonDarling, shapiroWilk } from '@shared/engine/methods/normality';
import { chiSquarePower, chiSquarePowerDf, fTestPower } from '@shared/engine/methods/sample-size';
import {
  capability, toleranceFactorExact, toleranceFactorHowe, toleranceFactorOneSided,
} from '@shared/engine/methods/capability';
import type { Alternative } from '@shared/engine/methods/target-test';
import { EPS, expectPrinted, repoRoot } from './support/check';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Any = any;
const fixture: Any = JSON.parse(readFileSync(path.join(repoRoot, 'test/fixtures/r/methods.json'), 'utf8'));

/** Worst relative error seen per function, printed at the end (the "achieved" column of the report). */
const worst = new Map<string, { rel: number; n: number }>();

/** Relative tolerances, in eps, per function. */
const N = {
  summary: 16, // compensated two-pass (or decimal-exact) vs R's long-double two-pass; achieved ≤ 3
  quantile: 4, // order-statistic interpolation; achieved ≤ 1
  chiInterval: 256, // through chisqQuantile; achieved 62
  chiP: 128, // through chisqCdf/Sf; achieved 27
  fTest: 256, // F p-value and interval through fCdf/fSf/fQuantile; achieved 55
  statistic: 32, // Levene/Brown-Forsythe F, Bartlett K², ANOVA SS and F; achieved ≤ 20
  groupsP: 512, // Bartlett, Levene, ANOVA p-values; achieved 125 (ANOVA p)
  shapiroW: 16, // achieved 2
  shapiroP: 8192, // normal upper tail of Royston's transform, p down to 1e-49; achieved 3724 (8e-13)
  anderson: 256, // A² (log Φ sums) and its p-value; achieved 94
  bonett: 64, // achieved 9
  power: 4096, // power via quantile then tail probability; achieved 2150 (5e-13)
  powerDf: 64, // continuous df, root of a quantile ratio; achieved 13
  howe: 32, // achieved 7
  exactK2: 256, // Gauss-Legendre integral + root vs R integrate + uniroot; achieved 9
  oneSided: 45000, // R's qt(ncp) warns it may not reach full precision; achieved 39525 (9e-12)
  capability: 16, // Cp bounds, Bissell bounds, fraction outside; achieved ≤ 3
};

function check(name: string, actual: number, expected: number, n: number, context: string): void {
  const rel = expected === 0 ? Math.abs(actual) : Math.abs(actual - expected) / Math.abs(expected);
  const w = worst.get(name) ?? { rel: 0, n };
  if (rel > w.rel) w.rel = rel;
  worst.set(name, w);
  const tol = n * EPS;
  expect(rel <= tol, `${name} [${context}]: got ${actual}, expected ${expected}, rel diff ${rel.toExponential(3)} > ${n} eps (${tol.toExponential(3)})`).to.equal(true);
}

function sample(i: number): Sample {
  return Sample.of(fixture.spreadSummary.input[i].values);
}

function groupsOf(input: Any): { label: string; sample: Sample }[] {
  const map = new Map<string, number[]>();
  (input.values as number[]).forEach((v, i) => {
    const g = input.groups[i] as string;
    const list = map.get(g) ?? [];
    list.push(v);
    map.set(g, list);
  });
  return [...map].map(([label, values]) => ({ label, sample: Sample.of(values) }));
}

describe(`methods against R (${fixture.R}; car ${fixture.packages.car}, nortest ${fixture.packages.nortest})`, function () {
  this.timeout(60_000);
  after(() => {
    const lines = [...worst].map(([name, w]) => `      ${name}: worst ${(w.rel / EPS).toFixed(1)} eps (${w.rel.toExponential(2)}), tolerance ${w.n} eps`);
    console.log(`\n      achieved relative error against R:\n${lines.join('\n')}`);
  });

  it('spread summary: mean, variance, sd (R mean/var/sd) and quartiles (R quantile type 7)', () => {
    fixture.spreadSummary.input.forEach((input: Any, i: number) => {
      const e = fixture.spreadSummary.expected[i];
      const s = spreadSummary(Sample.of(input.values));
      check('mean', s.mean, e.mean, N.summary, input.label);
      check('variance', s.variance, e.variance, N.summary, input.label);
      check('sd', s.sd, e.sd, N.summary, input.label);
      check('min/max', s.min, e.min, 0, input.label);
      check('min/max', s.max, e.max, 0, input.label);
      check('quartiles', s.q1, e.q1, N.quantile, input.label);
      check('quartiles', s.median, e.median, N.quantile, input.label);
      check('quartiles', s.q3, e.q3, N.quantile, input.label);
    });
  });

  it('chi-square interval for sigma², two-sided and one-sided, n from 2 to 1e7, level 0.5 to 0.999999 (R qchisq)', () => {
    fixture.chiSquareInterval.input.forEach((input: Any, i: number) => {
      const e = fixture.chiSquareInterval.expected[i];
      const ctx = `n=${input.n} v=${input.variance} level=${input.level}`;
      const two = chiSquareInterval(input.n, input.variance, input.level, 'two-sided');
      check('chi-square interval', two.varianceLower, e.twoSided[0], N.chiInterval, ctx + ' two-sided lower');
      check('chi-square interval', two.varianceUpper, e.twoSided[1], N.chiInterval, ctx + ' two-sided upper');
      check('chi-square interval', chiSquareInterval(input.n, input.variance, input.level, 'lower').varianceLower, e.lower, N.chiInterval, ctx + ' lower bound');
      check('chi-square interval', chiSquareInterval(input.n, input.variance, input.level, 'upper').varianceUpper, e.upper, N.chiInterval, ctx + ' upper bound');
    });
  });

  it('target test: statistic and p-values of all three alternatives (R pchisq)', () => {
    fixture.targetTest.input.forEach((input: Any, i: number) => {
      const e = fixture.targetTest.expected[i];
      const ctx = `n=${input.n} v=${input.variance} sigma0=${input.sigma0}`;
      for (const alt of ['two-sided', 'greater', 'less'] as const) {
        const t = chiSquareVarianceTest(input.n, input.variance, input.sigma0, alt, 0.05);
        check('target test statistic', t.statistic, e.statistic, 4, ctx);
        check('target test p', t.pValue, e[alt === 'two-sided' ? 'twoSided' : alt], N.chiP, `${ctx} ${alt}`);
      }
    });
  });

  it('two-sample ratio: F, p-value and confidence interval of R var.test, all alternatives, ratio 1 and 1.7', () => {
    fixture.varTest.input.forEach((input: Any, i: number) => {
      const e = fixture.varTest.expected[i];
      const x = Sample.of(input.x);
      const y = Sample.of(input.y);
      const alternative: Alternative = input.alternative === 'two.sided' ? 'two-sided' : input.alternative;
      const r = varianceRatioTest(x.n, x.moments.variance, y.n, y.moments.variance, { ratio0: input.ratio, alternative, level: input.level });
      const ctx = `n=${x.n},${y.n} ${alternative} ratio0=${input.ratio}`;
      check('F statistic', r.statistic, e.statistic, N.summary, ctx);
      check('F p-value', r.pValue, e.pValue, N.fTest, ctx);
      check('F interval', r.ratioLower, e.lower, N.fTest, ctx + ' lower');
      if (e.upper === null) expect(r.ratioUpper).to.equal(Infinity);
      else check('F interval', r.ratioUpper, e.upper, N.fTest, ctx + ' upper');
    });
  });

  it('group comparison: bartlett.test, car::leveneTest (center = mean, median), aov', () => {
    fixture.groups.input.forEach((input: Any, i: number) => {
      const e = fixture.groups.expected[i];
      const groups = groupsOf(input);
      const stats = groups.map(({ label, sample: s }) => ({ label, n: s.n, mean: s.moments.mean, variance: s.moments.variance }));
      const b = bartlettTest(stats);
      check('Bartlett K²', b.statistic, e.bartlett.statistic, N.statistic, input.label);
      expect(b.df).to.equal(e.bartlett.df);
      check('Bartlett p', b.pValue, e.bartlett.pValue, N.groupsP, input.label);
      const lm = leveneTest(groups, 'mean');
      check('Levene F', lm.statistic, e.levene.statistic, N.statistic, input.label);
      expect([lm.df1, lm.df2]).to.deep.equal([e.levene.df1, e.levene.df2]);
      check('Levene p', lm.pValue, e.levene.pValue, N.groupsP, input.label);
      const bf = leveneTest(groups, 'median');
      check('Brown-Forsythe F', bf.statistic, e.brownForsythe.statistic, N.statistic, input.label);
      check('Brown-Forsythe p', bf.pValue, e.brownForsythe.pValue, N.groupsP, input.label);
      const a = oneWayAnova(stats);
      check('ANOVA SS', a.ssBetween, e.anova.ssBetween, N.statistic, input.label);
      check('ANOVA SS', a.ssWithin, e.anova.ssWithin, N.statistic, input.label);
      check('ANOVA F', a.f, e.anova.f, N.statistic, input.label);
      check('ANOVA p', a.pValue, e.anova.pValue, N.groupsP, input.label);
    });
  });

  it('InsectSprays (R documentation example, Beall 1942): Bartlett K² = 25.96, df 5, p = 9.085e-05', () => {
    const i = fixture.groups.input.findIndex((g: Any) => String(g.label).startsWith('InsectSprays'));
    const groups = groupsOf(fixture.groups.input[i]);
    const b = bartlettTest(groups.map(({ label, sample: s }) => ({ label, n: s.n, mean: s.moments.mean, variance: s.moments.variance })));
    expectPrinted(b.statistic, '25.96', 'K²');
    expect(b.df).to.equal(5);
    expectPrinted(b.pValue, '9.085e-05', 'p');
  });

  it('Shapiro-Wilk: W and p of R shapiro.test for n = 3 … 4999 (AS R94)', () => {
    fixture.shapiroWilk.input.forEach((input: Any, i: number) => {
      const e = fixture.shapiroWilk.expected[i];
      const s = Sample.of(input.values);
      const sw = shapiroWilk(s.sorted());
      check('Shapiro-Wilk W', sw.statistic, e.statistic, N.shapiroW, `n=${s.n}`);
      check('Shapiro-Wilk p', sw.pValue, e.pValue, N.shapiroP, `n=${s.n}`);
    });
  });

  it('Anderson-Darling: A² and p of nortest::ad.test', () => {
    fixture.andersonDarling.input.forEach((input: Any, i: number) => {
      const e = fixture.andersonDarling.expected[i];
      const s = Sample.of(input.values);
      const ad = andersonDarling(s.sorted(), s.moments.mean, s.moments.sd);
      check('Anderson-Darling A²', ad.statistic, e.statistic, N.anderson, `n=${s.n}`);
      check('Anderson-Darling p', ad.pValue, e.pValue, N.anderson, `n=${s.n}`);
    });
  });

  it('Bonett interval: R transcription of Bonett (2006) with floor rounding, three levels, three sides', () => {
    fixture.bonett.input.forEach((input: Any, i: number) => {
      const e = fixture.bonett.expected[i];
      const b = bonettInterval(bonettBasis(sample(input.sample)), input.level, input.sides as Sides);
      const ctx = `sample ${input.sample} level ${input.level} ${input.sides}`;
      check('Bonett kurtosis', b.kurtosis, e.kurtosis, N.summary, ctx);
      if (input.sides === 'upper') expect(b.varianceLower).to.equal(0);
      else check('Bonett interval', b.varianceLower, e.lower, N.bonett, ctx + ' lower');
      if (e.upper === null) expect(b.varianceUpper).to.equal(Infinity);
      else check('Bonett interval', b.varianceUpper, e.upper, N.bonett, ctx + ' upper');
    });
  });

  it('power of the chi-square and F tests (R pchisq/qchisq, pf/qf), all alternatives', () => {
    fixture.power.input.forEach((input: Any, i: number) => {
      const e = fixture.power.expected[i];
      const ctx = `n=${input.n} ratio=${input.ratio} alpha=${input.alpha}`;
      for (const alt of ['two-sided', 'greater', 'less'] as const) {
        const key = alt === 'two-sided' ? 'twoSided' : alt;
        check('chi-square power', chiSquarePower(input.n, input.alpha, input.ratio, alt), e.chiSquare[key], N.power, `${ctx} ${alt}`);
        check('F power', fTestPower(input.n, input.alpha, input.ratio, alt), e.f[key], N.power, `${ctx} ${alt}`);
      }
    });
  });

  it('continuous df of the one-sided chi-square test for a power (R uniroot on qchisq)', () => {
    fixture.powerDf.input.forEach((input: Any, i: number) => {
      const df = chiSquarePowerDf(input.alpha, Math.sqrt(input.varianceRatio), 'greater', input.power);
      check('power df', df, fixture.powerDf.expected[i].df, N.powerDf, JSON.stringify(input));
    });
  });

  it('tolerance factors: Howe, exact two-sided (R integrate + uniroot), one-sided (R qt with ncp)', () => {
    fixture.tolerance.input.forEach((input: Any, i: number) => {
      const e = fixture.tolerance.expected[i];
      const ctx = JSON.stringify(input);
      check('Howe k2', toleranceFactorHowe(input.n, input.coverage, input.confidence), e.howe, N.howe, ctx);
      check('exact k2', toleranceFactorExact(input.n, input.coverage, input.confidence), e.exact, N.exactK2, ctx);
      check('one-sided k1', toleranceFactorOneSided(input.n, input.coverage, input.confidence), e.oneSided, N.oneSided, ctx);
    });
  });

  it('capability: Cp, Cpk, chi-square Cp bounds, Bissell Cpk bounds, fraction outside', () => {
    fixture.capability.input.forEach((input: Any, i: number) => {
      const e = fixture.capability.expected[i];
      const c = capability(input);
      const ctx = JSON.stringify(input);
      check('Cp/Cpk', c.cp!, e.cp, 4, ctx);
      check('Cp/Cpk', c.cpk!, e.cpk, 4, ctx);
      check('Cp bounds', c.cpLower!, e.cpLower, N.capability, ctx);
      check('Cp bounds', c.cpUpper!, e.cpUpper, N.capability, ctx);
      check('Cpk bounds', c.cpkLower!, e.cpkLower, N.capability, ctx);
      check('Cpk bounds', c.cpkUpper!, e.cpkUpper, N.capability, ctx);
      check('fraction outside', c.fractionOutside, e.fractionOutside, N.capability, ctx);
    });
  });
});
