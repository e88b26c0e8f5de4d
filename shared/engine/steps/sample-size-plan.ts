/** Sample-size-plan step: n for an interval ratio or a ± percent, power of the chi-square and F tests. */
import type { StepOfKind } from '../../format/worksheet';
import {
  chiSquarePower, fTestPower, intervalRatio, powerCurve, relativePrecisionProbability, sampleSizeForChiSquarePower,
  sampleSizeForFPower, sampleSizeForIntervalRatio, sampleSizeForRelativePrecision,
} from '../methods/sample-size';
import { normQuantileUpper } from '../distributions/index';
import { countValue, numberValue, texNumber, STANDARD_CAUTION, type StepResult } from '../result';
import { CITE, fmt, normalityAssumption, percent } from './common';
import { guard, requireLevel, StepFailure, type RunContext } from './context';
import { powerCurvePlot } from './plots';

export function runSampleSizePlan(step: StepOfKind<'sample-size-plan'>, ctx: RunContext, result: StepResult): void {
  const plan = step.params.plan;
  const digits = ctx.digits;
  const fields = { level: 'params.plan.level', ratio: 'params.plan.ratio', percent: 'params.plan.percent', alpha: 'params.plan.alpha', power: 'params.plan.power', '*': 'params.plan' };
  result.assumptions.push(normalityAssumption('The plan'));
  result.caution = STANDARD_CAUTION;

  if (plan.goal === 'interval-ratio') {
    requireLevel(plan.level, 'params.plan.level');
    const n = guard(fields, () => sampleSizeForIntervalRatio(plan.level, plan.ratio, plan.scale));
    const achieved = intervalRatio(n, plan.level, plan.scale);
    result.values.push(countValue('n', 'measurements needed', n), numberValue('achievedRatio', 'upper/lower at that n', achieved, { digits }));
    const sym = plan.scale === 'sigma' ? '\\sqrt{\\chi^2_{1-\\alpha/2,\\nu}/\\chi^2_{\\alpha/2,\\nu}}' : '\\chi^2_{1-\\alpha/2,\\nu}/\\chi^2_{\\alpha/2,\\nu}';
    result.formulas.push({ id: 'ratio', label: 'ratio of the interval limits', symbolic: `\\min n:\\; ${sym} \\le R`, substituted: `n = ${n}:\\; ${texNumber(achieved)} \\le ${texNumber(plan.ratio)}` });
    result.reading = `${n} measurements make the two-sided ${percent(plan.level)} chi-square interval for ${plan.scale === 'sigma' ? 'sigma' : 'the variance'} no wider than ${fmt(plan.ratio, digits)} : 1 (upper/lower ${fmt(achieved, digits)}), whatever the data, if they are independent and normal.`;
    const points: { ratio: number; power: number }[] = [];
    for (let m = Math.max(2, Math.floor(n / 4)); m <= n * 3; m += Math.max(1, Math.floor(n / 20))) points.push({ ratio: m, power: intervalRatio(m, plan.level, plan.scale) });
    result.plot = { ...powerCurvePlot(points, 'n', `Upper/lower ratio of the ${percent(plan.level)} interval against n`), layer: [{ data: { values: points }, mark: { type: 'line' }, encoding: { x: { field: 'ratio', type: 'quantitative', title: 'n' }, y: { field: 'power', type: 'quantitative', title: 'upper / lower', scale: { zero: false } } } }] };
    result.sources.push(CITE.nistChiSquare);
    return;
  }

  if (plan.goal === 'relative-precision') {
    requireLevel(plan.level, 'params.plan.level');
    const n = guard(fields, () => sampleSizeForRelativePrecision(plan.level, plan.percent, plan.criterion));
    const d = plan.percent / 100;
    const prob = relativePrecisionProbability(n, d);
    result.values.push(countValue('n', 'measurements needed', n), numberValue('probability', 'P(|s/sigma − 1| < d) at that n', prob, { digits }));
    if (plan.criterion === 'exact') {
      result.formulas.push({ id: 'criterion', label: 'exact criterion (chi-square distribution of s)', symbolic: '\\min n:\\; P\\left((1-d)^2\\nu < \\chi^2_\\nu < (1+d)^2\\nu\\right) \\ge \\gamma,\\; \\nu = n-1', substituted: `n = ${n}:\\; P = ${texNumber(prob)} \\ge ${plan.level}` });
      result.reading = `With ${n} measurements the sample sd is within ± ${plan.percent} % of the true sigma with probability at least ${percent(plan.level)} (exact chi-square criterion), if the measurements are independent and normal.`;
      result.sources.push(CITE.greenwood, CITE.nistChiSquare);
    } else {
      const z = normQuantileUpper((1 - plan.level) / 2);
      result.formulas.push({ id: 'criterion', label: 'Greenwood-Sandomire (normal approximation of s)', symbolic: 'n = \\operatorname{round}\\left(\\frac{1}{2}\\left(\\frac{z_{(1+\\gamma)/2}}{d}\\right)^2\\right)', substituted: `n = \\operatorname{round}\\left(\\frac{1}{2}\\left(\\frac{${texNumber(z)}}{${d}}\\right)^2\\right) = ${n}` });
      result.reading = `Greenwood and Sandomire's normal approximation asks for ${n} measurements to know sigma within ± ${plan.percent} % at ${percent(plan.level)}; the exact chi-square criterion gives P = ${fmt(prob, digits)} at that n.`;
      result.sources.push(CITE.greenwood);
      if (prob < plan.level) result.warnings.push({ code: 'approximation-short', message: `At n = ${n} the exact probability is ${fmt(prob, 4)}, a little below ${plan.level}; the exact criterion asks for more measurements.` });
    }
    const points: { ratio: number; power: number }[] = [];
    for (let m = 2; m <= Math.max(n * 2, 10); m += Math.max(1, Math.floor(n / 40))) points.push({ ratio: m, power: relativePrecisionProbability(m, d) });
    result.plot = powerCurvePlot(points, 'n', `P(|s/sigma − 1| < ${plan.percent} %) against n`, plan.level, 'probability');
    return;
  }

  // Power of the chi-square or F test.
  requireLevel(plan.alpha, 'params.plan.alpha', 'significance level');
  if (!Number.isFinite(plan.ratio) || plan.ratio <= 0 || plan.ratio === 1) throw new StepFailure('invalid-parameter', 'params.plan.ratio', `the true ratio must be a positive number other than 1 (got ${plan.ratio})`);
  if (plan.n === undefined && plan.power === undefined) throw new StepFailure('invalid-parameter', 'params.plan.n', 'give either n (to get the power) or power (to get n)');
  if (plan.power !== undefined) requireLevel(plan.power, 'params.plan.power', 'required power');
  if (plan.n !== undefined && plan.n < 2) throw new StepFailure('insufficient-data', 'params.plan.n', `n must be at least 2 (got ${plan.n})`);
  const isChi = plan.goal === 'chi-square-power';
  const powerAt = (n: number, ratio: number) => (isChi ? chiSquarePower(n, plan.alpha, ratio, plan.alternative) : fTestPower(n, plan.alpha, ratio, plan.alternative));
  const n = plan.n ?? guard(fields, () => (isChi ? sampleSizeForChiSquarePower : sampleSizeForFPower)(plan.alpha, plan.ratio, plan.alternative, plan.power as number));
  const power = powerAt(n, plan.ratio);
  const what = isChi ? 'chi-square test of sigma against sigma0' : 'F test of two variances';
  const ratioName = isChi ? 'sigma/sigma0' : 'sigma1/sigma2';
  result.values.push(countValue('n', isChi ? 'measurements' : 'measurements per group', n), numberValue('power', 'power', power, { digits }), numberValue('ratio', `true ${ratioName}`, plan.ratio, { digits }));
  result.formulas.push(isChi
    ? { id: 'power', label: 'power of the chi-square test', symbolic: plan.alternative === 'greater' ? '1-\\beta = P\\left(\\chi^2_\\nu > \\chi^2_{1-\\alpha,\\nu}/\\lambda^2\\right)' : plan.alternative === 'less' ? '1-\\beta = P\\left(\\chi^2_\\nu < \\chi^2_{\\alpha,\\nu}/\\lambda^2\\right)' : '1-\\beta = P\\left(\\chi^2_\\nu < \\chi^2_{\\alpha/2,\\nu}/\\lambda^2\\right) + P\\left(\\chi^2_\\nu > \\chi^2_{1-\\alpha/2,\\nu}/\\lambda^2\\right)', substituted: `\\lambda = ${texNumber(plan.ratio)},\\; \\nu = ${n - 1} \\Rightarrow 1-\\beta = ${texNumber(power)}` }
    : { id: 'power', label: 'power of the F test', symbolic: plan.alternative === 'greater' ? '1-\\beta = P\\left(F_{\\nu,\\nu} > F_{1-\\alpha;\\nu,\\nu}/\\lambda^2\\right)' : plan.alternative === 'less' ? '1-\\beta = P\\left(F_{\\nu,\\nu} < F_{\\alpha;\\nu,\\nu}/\\lambda^2\\right)' : '1-\\beta = P\\left(F < F_{\\alpha/2}/\\lambda^2\\right) + P\\left(F > F_{1-\\alpha/2}/\\lambda^2\\right)', substituted: `\\lambda = ${texNumber(plan.ratio)},\\; \\nu = ${n - 1} \\Rightarrow 1-\\beta = ${texNumber(power)}` });
  result.reading = plan.n !== undefined
    ? `With ${n} measurements${isChi ? '' : ' per group'}, the ${what} at alpha = ${plan.alpha} detects a true ${ratioName} of ${fmt(plan.ratio, digits)} with probability ${fmt(power, 3)}, if the measurements are independent and normal.`
    : `${n} measurements${isChi ? '' : ' per group'} give the ${what} at alpha = ${plan.alpha} a power of at least ${plan.power} (${fmt(power, 3)}) against a true ${ratioName} of ${fmt(plan.ratio, digits)}, if the measurements are independent and normal.`;
  if (plan.power !== undefined) result.conclusions.push({ id: 'powerReached', value: power >= plan.power, statement: `the power at n = ${n} reaches the required ${plan.power}` });
  const far = plan.alternative === 'less' ? Math.min(plan.ratio, 1 / 1.5) * 0.8 : Math.max(plan.ratio, 1.5) * 1.25;
  const curve = powerCurve((ratio) => (ratio === 1 ? plan.alpha : powerAt(n, ratio)), far);
  result.plot = powerCurvePlot(curve, `true ${ratioName}`, `Power of the ${what} at n = ${n}`, plan.power);
  result.sources.push(isChi ? CITE.sampleSize : CITE.nistF);
}
