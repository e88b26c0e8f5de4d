/** Capability step: Cp, Cpk, Cpl, Cpu with confidence bounds, fraction outside, tolerance intervals. */
import type { StepOfKind } from '../../format/worksheet';
import {
  capability, toleranceFactorExact, toleranceFactorHowe, toleranceFactorOneSided, toleranceFactorOneSidedNatrella,
} from '../methods/capability';
import { countValue, locationDigits, numberValue, texNumber, unavailableValue, STANDARD_CAUTION, type StepResult } from '../result';
import { CITE, fmt, INDEPENDENCE, normalityAssumption, percent, withUnit } from './common';
import { guard, requireLevel, StepFailure, type RunContext } from './context';
import { capabilityPlot } from './plots';
import { resolveOne } from './single';

/** Common-practice threshold used for the named conclusion (customer requirements govern). */
const CPK_THRESHOLD = 1.33;

export function runCapability(step: StepOfKind<'capability'>, ctx: RunContext, result: StepResult): void {
  const { lsl, usl, level, tolerance } = step.params;
  const digits = ctx.digits;
  if (lsl === undefined && usl === undefined && !tolerance) throw new StepFailure('invalid-parameter', 'params.usl', 'give a specification limit (lsl and/or usl) or a tolerance interval request');
  if (lsl !== undefined && usl !== undefined && !(lsl < usl)) throw new StepFailure('invalid-parameter', 'params.lsl', `the lower specification limit (${lsl}) must be below the upper specification limit (${usl})`);
  requireLevel(level, 'params.level');
  if (tolerance) {
    requireLevel(tolerance.coverage, 'params.tolerance.coverage', 'coverage proportion');
    requireLevel(tolerance.confidence, 'params.tolerance.confidence');
  }
  const r = resolveOne(ctx, step.params.source, 'A capability study');
  if (r.mean === null) throw new StepFailure('invalid-parameter', 'params.source', 'capability needs the mean; give it with the summary statistics');
  const unit = r.unit;
  const mean = r.mean;
  const n = r.n;
  const ld = (v: number) => locationDigits(v, r.sd, digits);
  result.values.push(countValue('n', 'n', n), numberValue('mean', 'mean', mean, { unit, digits: ld(mean), symbol: '\\bar x' }), numberValue('sd', 'standard deviation', r.sd, { unit, digits, symbol: 's' }));
  const readings: string[] = [];

  if (lsl !== undefined || usl !== undefined) {
    const c = guard({ level: 'params.level', limits: 'params.lsl', '*': 'params.source' }, () => capability({ n, mean, sd: r.sd, lsl, usl, level }));
    const opt = (id: string, label: string, v: number | null, reason: string, symbol?: string) =>
      v === null ? unavailableValue(id, label, reason) : numberValue(id, label, v, { digits, symbol });
    result.values.push(
      opt('cp', 'Cp', c.cp, 'needs both specification limits', 'C_p'),
      opt('cpk', 'Cpk', c.cpk, 'needs a specification limit', 'C_{pk}'),
      opt('cpl', 'Cpl', c.cpl, 'needs the lower specification limit', 'C_{pl}'),
      opt('cpu', 'Cpu', c.cpu, 'needs the upper specification limit', 'C_{pu}'),
      opt('cpLower', `Cp lower (${percent(level)})`, c.cpLower, 'needs both specification limits'),
      opt('cpUpper', `Cp upper (${percent(level)})`, c.cpUpper, 'needs both specification limits'),
      opt('cpkLower', `Cpk lower (${percent(level)}, Bissell)`, c.cpkLower, 'needs a specification limit'),
      opt('cpkUpper', `Cpk upper (${percent(level)}, Bissell)`, c.cpkUpper, 'needs a specification limit'),
      numberValue('fractionOutside', 'expected fraction outside (normal model)', c.fractionOutside, { digits }),
      numberValue('ppmOutside', 'expected parts per million outside', c.fractionOutside * 1e6, { digits }),
    );
    const limitsTex = `${lsl !== undefined ? `\\mathrm{LSL} = ${texNumber(lsl)}` : ''}${lsl !== undefined && usl !== undefined ? ',\\; ' : ''}${usl !== undefined ? `\\mathrm{USL} = ${texNumber(usl)}` : ''}`;
    result.formulas.push({
      id: 'indices',
      label: 'capability indices',
      symbolic: 'C_p = \\frac{\\mathrm{USL}-\\mathrm{LSL}}{6s},\\; C_{pu} = \\frac{\\mathrm{USL}-\\bar x}{3s},\\; C_{pl} = \\frac{\\bar x-\\mathrm{LSL}}{3s},\\; C_{pk} = \\min(C_{pu}, C_{pl})',
      substituted: `${limitsTex},\\; \\bar x = ${texNumber(mean)},\\; s = ${texNumber(r.sd)}${c.cp !== null ? `,\\; C_p = ${texNumber(c.cp)}` : ''},\\; C_{pk} = ${texNumber(c.cpk as number)}`,
    });
    if (c.cp !== null) {
      result.formulas.push({
        id: 'cp-bounds',
        label: `Cp bounds (chi-square), ${percent(level)}`,
        symbolic: 'C_p\\sqrt{\\frac{\\chi^2_{\\alpha/2,\\nu}}{\\nu}} \\le C_p^{\\text{true}} \\le C_p\\sqrt{\\frac{\\chi^2_{1-\\alpha/2,\\nu}}{\\nu}}',
        substituted: `${texNumber(c.cpLower as number)} \\le C_p^{\\text{true}} \\le ${texNumber(c.cpUpper as number)}`,
      });
    }
    result.formulas.push({
      id: 'cpk-bounds',
      label: `Cpk bounds (Bissell 1990), ${percent(level)}`,
      symbolic: '\\hat C_{pk} \\pm z_{1-\\alpha/2}\\sqrt{\\frac{1}{9n} + \\frac{\\hat C_{pk}^2}{2(n-1)}}',
      substituted: `${texNumber(c.cpk as number)} \\pm ${texNumber((c.cpkUpper as number) - (c.cpk as number))} = [${texNumber(c.cpkLower as number)},\\; ${texNumber(c.cpkUpper as number)}]`,
    });
    result.conclusions.push({ id: 'cpkLowerBoundAtLeast1.33', value: (c.cpkLower as number) >= CPK_THRESHOLD, statement: `the ${percent(level)} lower confidence bound of Cpk is at least ${CPK_THRESHOLD} (a common-practice threshold; the customer's requirement governs)` });
    readings.push(`Cpk is ${fmt(c.cpk as number, digits)}; with ${percent(level)} confidence the true Cpk lies between ${fmt(c.cpkLower as number, digits)} and ${fmt(c.cpkUpper as number, digits)}${c.cp !== null ? ` and Cp between ${fmt(c.cpLower as number, digits)} and ${fmt(c.cpUpper as number, digits)}` : ''}. A normal model puts about ${fmt(c.fractionOutside * 1e6, 3)} parts per million outside the limits, if the process is stable and its output normal.`);
    result.sources.push(CITE.capability, CITE.bissell);
    result.plot = capabilityPlot(mean, r.sd, lsl, usl, r.quantity, unit);
    if (n < 30) result.warnings.push({ code: 'small-n', message: `With n = ${n} the capability indices are very uncertain; judge by the lower bound, not the point value.` });
  }

  if (tolerance) {
    const { coverage, confidence, sides } = tolerance;
    const fields = { coverage: 'params.tolerance.coverage', confidence: 'params.tolerance.confidence', '*': 'params.source' };
    if (sides === 'two-sided') {
      const howe = guard(fields, () => toleranceFactorHowe(n, coverage, confidence));
      const exact = guard(fields, () => toleranceFactorExact(n, coverage, confidence));
      result.values.push(
        numberValue('k2', 'tolerance factor k2 (exact)', exact, { digits, symbol: 'k_2' }),
        numberValue('k2Howe', 'tolerance factor k2 (Howe)', howe, { digits }),
        numberValue('toleranceLower', 'tolerance interval lower', mean - exact * r.sd, { unit, digits: ld(mean - exact * r.sd) }),
        numberValue('toleranceUpper', 'tolerance interval upper', mean + exact * r.sd, { unit, digits: ld(mean + exact * r.sd) }),
      );
      result.formulas.push({
        id: 'tolerance',
        label: 'two-sided normal tolerance interval',
        symbolic: '\\bar x \\pm k_2 s,\\quad \\gamma = 2\\int_0^\\infty \\phi(u)\\, P\\!\\left(\\chi^2_\\nu > \\frac{\\nu\\, r^2(u/\\sqrt n;\\,p)}{k_2^2}\\right) du \\;(\\text{exact}),\\quad k_2^{\\text{Howe}} = \\sqrt{\\frac{\\nu(1+1/n)z^2_{(1+p)/2}}{\\chi^2_{1-\\gamma,\\nu}}}',
        substituted: `${texNumber(mean)} \\pm ${texNumber(exact)} \\times ${texNumber(r.sd)} = [${texNumber(mean - exact * r.sd)},\\; ${texNumber(mean + exact * r.sd)}]\\;(k_2^{\\text{Howe}} = ${texNumber(howe)})`,
      });
      readings.push(`With ${percent(confidence)} confidence at least ${percent(coverage)} of the output lies between ${fmt(mean - exact * r.sd, ld(mean - exact * r.sd))} and ${withUnit(fmt(mean + exact * r.sd, ld(mean + exact * r.sd)), unit)}, if it is normal.`);
      result.sources.push(CITE.howe, CITE.odehOwen);
    } else {
      const approx = guard(fields, () => toleranceFactorOneSidedNatrella(n, coverage, confidence));
      const k1 = guard(fields, () => toleranceFactorOneSided(n, coverage, confidence));
      const limit = sides === 'upper' ? mean + k1 * r.sd : mean - k1 * r.sd;
      result.values.push(
        numberValue('k1', 'tolerance factor k1 (noncentral t)', k1, { digits, symbol: 'k_1' }),
        numberValue('k1Natrella', 'tolerance factor k1 (Natrella approximation)', approx, { digits }),
        numberValue(sides === 'upper' ? 'toleranceUpper' : 'toleranceLower', `one-sided tolerance limit (${sides})`, limit, { unit, digits: ld(limit) }),
      );
      result.formulas.push({
        id: 'tolerance',
        label: 'one-sided normal tolerance limit',
        symbolic: `\\bar x ${sides === 'upper' ? '+' : '-'} k_1 s,\\quad k_1 = \\frac{t'_{\\gamma}(\\nu,\\; z_p\\sqrt n)}{\\sqrt n}`,
        substituted: `${texNumber(mean)} ${sides === 'upper' ? '+' : '-'} ${texNumber(k1)} \\times ${texNumber(r.sd)} = ${texNumber(limit)}`,
      });
      readings.push(`With ${percent(confidence)} confidence at least ${percent(coverage)} of the output lies ${sides === 'upper' ? 'below' : 'above'} ${withUnit(fmt(limit, ld(limit)), unit)}, if it is normal.`);
      result.sources.push(CITE.odehOwen);
    }
  }
  result.reading = readings.join(' ');
  result.assumptions.push(INDEPENDENCE, { id: 'stable-process', statement: 'The process is stable (in statistical control) over the period sampled; capability of an unstable process predicts nothing.', status: 'by-design' }, normalityAssumption('Capability indices, their bounds and the tolerance intervals'));
  result.caution = STANDARD_CAUTION;
}
