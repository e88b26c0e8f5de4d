/** Sigma-interval step: chi-square and Bonett intervals for sigma² and sigma at one or more levels. */
import type { StepOfKind } from '../../format/worksheet';
import { bonettBasis, bonettInterval, chiSquareInterval, type BonettBasis, type Sides } from '../methods/variance-interval';
import { countValue, numberValue, squaredUnit, texNumber, unavailableValue, STANDARD_CAUTION, type ResultValue, type StepResult } from '../result';
import { CITE, fmt, INDEPENDENCE, normalityAssumption, percent, withUnit } from './common';
import { guard, requireLevel, StepFailure, type RunContext } from './context';
import { intervalChart, type IntervalRow } from './plots';
import { resolveOne } from './single';

function sidesText(sides: Sides): string {
  return sides === 'two-sided' ? 'two-sided interval' : sides === 'lower' ? 'lower confidence bound' : 'upper confidence bound';
}

export function runSigmaInterval(step: StepOfKind<'sigma-interval'>, ctx: RunContext, result: StepResult): void {
  const { levels, sides, methods } = step.params;
  const digits = ctx.digits;
  levels.forEach((level, i) => requireLevel(level, `params.levels.${i}`));
  const dupLevel = levels.find((l, i) => levels.indexOf(l) !== i);
  if (dupLevel !== undefined) throw new StepFailure('invalid-parameter', 'params.levels', `the level ${dupLevel} is listed twice`);
  const r = resolveOne(ctx, step.params.source, 'A sigma interval');
  const unit = r.unit;
  const vUnit = squaredUnit(unit);
  const n = r.n;
  const df = n - 1;

  result.values.push(
    countValue('n', 'n', n),
    countValue('df', 'degrees of freedom', df, { symbol: '\\nu' }),
    numberValue('sd', 'standard deviation', r.sd, { unit, digits, symbol: 's' }),
    numberValue('variance', 'variance', r.variance, { unit: vUnit, digits, symbol: 's^2' }),
  );

  let basis: BonettBasis | null = null;
  let bonettReason: string | null = null;
  if (methods.includes('bonett')) {
    if (!r.sample) bonettReason = "Bonett's interval needs the individual values (it estimates the kurtosis); only summary statistics were given";
    else if (n < 5) bonettReason = `Bonett's interval needs n ≥ 5 (n = ${n})`;
    else basis = guard({ '*': 'params.source' }, () => bonettBasis(r.sample!));
  }

  const columns = [
    { id: 'level', label: 'confidence level' },
    { id: 'sdLower', label: 'sigma lower', ...(unit ? { unit } : {}) },
    { id: 'sdUpper', label: 'sigma upper', ...(unit ? { unit } : {}) },
    { id: 'varianceLower', label: 'variance lower', ...(vUnit ? { unit: vUnit } : {}) },
    { id: 'varianceUpper', label: 'variance upper', ...(vUnit ? { unit: vUnit } : {}) },
  ];
  const chartRows: IntervalRow[] = [];
  const boundValue = (id: string, label: string, v: number, u: string | undefined, isOpenSide: boolean): ResultValue =>
    isOpenSide ? unavailableValue(id, label, v === 0 ? 'one-sided bound: no lower limit (0)' : 'one-sided bound: no upper limit', { unit: u }) : numberValue(id, label, v, { unit: u, digits });
  const cellsFor = (level: number, lo: number, hi: number, vlo: number, vhi: number): ResultValue[] => [
    numberValue('level', 'confidence level', level, { digits: 3 }),
    boundValue('sdLower', 'sigma lower', lo, unit, sides === 'upper'),
    boundValue('sdUpper', 'sigma upper', hi, unit, sides === 'lower'),
    boundValue('varianceLower', 'variance lower', vlo, vUnit, sides === 'upper'),
    boundValue('varianceUpper', 'variance upper', vhi, vUnit, sides === 'lower'),
  ];

  const readings: string[] = [];
  if (methods.includes('chi-square')) {
    const rows = levels.map((level, i) => {
      const ci = guard({ level: `params.levels.${i}`, '*': 'params.source' }, () => chiSquareInterval(n, r.variance, level, sides));
      chartRows.push({ level: percent(level), method: 'chi-square', lower: sides === 'upper' ? r.sd : ci.sdLower, upper: sides === 'lower' ? r.sd : ci.sdUpper, estimate: r.sd });
      if (i === 0) {
        pushHeadline(result, 'chisq', 'chi-square', ci.sdLower, ci.sdUpper, sides, unit, digits);
        const q = sides === 'two-sided'
          ? { lo: `\\chi^2_{1-\\alpha/2,\\,\\nu}`, hi: `\\chi^2_{\\alpha/2,\\,\\nu}` }
          : { lo: `\\chi^2_{1-\\alpha,\\,\\nu}`, hi: `\\chi^2_{\\alpha,\\,\\nu}` };
        const ss = texNumber(df * r.variance);
        let symbolic: string;
        let substituted: string;
        if (sides === 'two-sided') {
          symbolic = `\\frac{\\nu s^2}{${q.lo}} \\le \\sigma^2 \\le \\frac{\\nu s^2}{${q.hi}}`;
          substituted = `\\frac{${ss}}{${texNumber(ci.chiUpperQuantile!)}} \\le \\sigma^2 \\le \\frac{${ss}}{${texNumber(ci.chiLowerQuantile!)}} \\;\\Rightarrow\\; ${texNumber(ci.sdLower)} \\le \\sigma \\le ${texNumber(ci.sdUpper)}`;
        } else if (sides === 'lower') {
          symbolic = `\\sigma^2 \\ge \\frac{\\nu s^2}{${q.lo}}`;
          substituted = `\\sigma^2 \\ge \\frac{${ss}}{${texNumber(ci.chiUpperQuantile!)}} \\;\\Rightarrow\\; \\sigma \\ge ${texNumber(ci.sdLower)}`;
        } else {
          symbolic = `\\sigma^2 \\le \\frac{\\nu s^2}{${q.hi}}`;
          substituted = `\\sigma^2 \\le \\frac{${ss}}{${texNumber(ci.chiLowerQuantile!)}} \\;\\Rightarrow\\; \\sigma \\le ${texNumber(ci.sdUpper)}`;
        }
        result.formulas.push({ id: 'chi-square', label: `chi-square ${sidesText(sides)}, ${percent(level)}`, symbolic, substituted });
        readings.push(sentence(level, sides, ci.sdLower, ci.sdUpper, unit, digits) + ', if the measurements are independent and normal.');
      }
      return { id: `chi-square@${level}`, label: `chi-square, ${percent(level)}`, cells: cellsFor(level, ci.sdLower, ci.sdUpper, ci.varianceLower, ci.varianceUpper) };
    });
    result.tables.push({ id: 'chi-square', title: `Chi-square ${sidesText(sides)} (normal theory)`, columns, rows });
    result.assumptions.push(normalityAssumption('The chi-square interval'));
    result.sources.push(CITE.nistChiSquare);
  }

  if (methods.includes('bonett')) {
    if (!basis) {
      result.values.push(unavailableValue('bonett.sdLower', "sigma lower (Bonett)", bonettReason as string, { unit }), unavailableValue('bonett.sdUpper', "sigma upper (Bonett)", bonettReason as string, { unit }));
      result.warnings.push({ code: 'bonett-not-available', message: bonettReason as string });
    } else {
      const b0 = basis;
      const rows = levels.map((level, i) => {
        const b = guard({ level: `params.levels.${i}`, '*': 'params.source' }, () => bonettInterval(b0, level, sides));
        chartRows.push({ level: percent(level), method: 'Bonett', lower: sides === 'upper' ? r.sd : b.sdLower, upper: sides === 'lower' ? r.sd : b.sdUpper, estimate: r.sd });
        if (i === 0) {
          pushHeadline(result, 'bonett', 'Bonett', b.sdLower, b.sdUpper, sides, unit, digits);
          result.values.push(
            numberValue('bonett.kurtosis', 'kurtosis estimate (Bonett)', b.kurtosis, { digits, symbol: '\\hat\\gamma_4' }),
            countValue('bonett.trimmed', 'values trimmed from each end', b.trimmedCount),
          );
          const zSym = sides === 'two-sided' ? 'z_{1-\\alpha/2}' : 'z_{1-\\alpha}';
          result.formulas.push({
            id: 'bonett',
            label: `Bonett (2006), ${percent(level)}`,
            symbolic: `\\exp\\!\\left(\\ln(c\\,s^2) \\pm ${zSym}\\,\\mathrm{se}\\right),\\; c = \\frac{n}{n-${zSym}},\\; \\mathrm{se} = c\\sqrt{\\frac{\\hat\\gamma_4 - (n-3)/n}{n-1}},\\; \\hat\\gamma_4 = \\frac{n\\sum(x_i-m)^4}{\\left(\\sum(x_i-\\bar{x})^2\\right)^2}`,
            substituted: `c = ${texNumber(b.c)},\\; \\hat\\gamma_4 = ${texNumber(b.kurtosis)},\\; \\mathrm{se} = ${texNumber(b.se)},\\; z = ${texNumber(b.z)} \\;\\Rightarrow\\; ${sides === 'upper' ? '' : texNumber(b.sdLower) + ' \\le '}\\sigma${sides === 'lower' ? '' : ' \\le ' + texNumber(b.sdUpper)}`,
          });
          readings.push(`Bonett's interval, which does not assume normality, gives ${sentence(level, sides, b.sdLower, b.sdUpper, unit, digits, true)}.`);
        }
        return { id: `bonett@${level}`, label: `Bonett, ${percent(level)}`, cells: cellsFor(level, b.sdLower, b.sdUpper, b.varianceLower, b.varianceUpper) };
      });
      result.tables.push({ id: 'bonett', title: `Bonett ${sidesText(sides)} (robust to non-normal kurtosis)`, columns, rows });
      result.sources.push(CITE.bonett);
      if (n < 20) result.warnings.push({ code: 'bonett-small-n', message: `With n = ${n} Bonett's interval is approximate; its coverage can fall below the stated level for small samples from heavy-tailed distributions.` });
    }
  }
  result.assumptions.unshift(INDEPENDENCE);
  result.reading = readings.join(' ');
  result.plot = intervalChart(chartRows, 'sigma', unit);
  result.caution = STANDARD_CAUTION;
}

function pushHeadline(result: StepResult, id: string, label: string, lo: number, hi: number, sides: Sides, unit: string | undefined, digits: number): void {
  if (sides !== 'upper') result.values.push(numberValue(`${id}.sdLower`, `sigma lower (${label})`, lo, { unit, digits }));
  if (sides !== 'lower') result.values.push(numberValue(`${id}.sdUpper`, `sigma upper (${label})`, hi, { unit, digits }));
}

function sentence(level: number, sides: Sides, lo: number, hi: number, unit: string | undefined, digits: number, short = false): string {
  const head = short ? '' : `With ${percent(level)} confidence the process sigma `;
  if (sides === 'two-sided') return `${head}${short ? `${fmt(lo, digits)} to ${withUnit(fmt(hi, digits), unit)}` : `lies between ${fmt(lo, digits)} and ${withUnit(fmt(hi, digits), unit)}`}`;
  if (sides === 'lower') return `${head}${short ? 'at least ' : 'is at least '}${withUnit(fmt(lo, digits), unit)}`;
  return `${head}${short ? 'at most ' : 'is at most '}${withUnit(fmt(hi, digits), unit)}`;
}
