/** Pieces shared by the step runners: assumptions, citations, wording. */
import type { Assumption, Citation } from '../result';
import { formatSignificant } from '../result';

export const CITE = {
  nistChiSquare: { id: 'nist-1.3.5.8', text: 'NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.5.8 Chi-Square Test for the Standard Deviation; 7.2.3 Confidence limits for the variance.' },
  bonett: { id: 'bonett-2006', text: 'Bonett, D. G. (2006). Approximate confidence interval for standard deviation of nonnormal distributions. Computational Statistics & Data Analysis 50(3), 775–782.' },
  nistF: { id: 'nist-1.3.5.9', text: 'NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.5.9 F-Test for Equality of Two Variances; 7.3.2.' },
  bartlett: { id: 'bartlett-1937', text: 'Bartlett, M. S. (1937). Properties of sufficiency and statistical tests. Proc. Royal Society A 160, 268–282 (NIST e-Handbook 1.3.5.7).' },
  levene: { id: 'levene-1960', text: 'Levene, H. (1960). Robust tests for equality of variances. In Contributions to Probability and Statistics, Stanford University Press, 278–292 (NIST e-Handbook 1.3.5.10).' },
  brownForsythe: { id: 'brown-forsythe-1974', text: 'Brown, M. B. & Forsythe, A. B. (1974). Robust tests for the equality of variances. JASA 69, 364–367.' },
  anova: { id: 'nist-7.4.3', text: 'NIST/SEMATECH e-Handbook of Statistical Methods, 7.4.3 Are the means equal? (one-way ANOVA).' },
  shapiroWilk: { id: 'royston-1995', text: 'Royston, P. (1995). Remark AS R94: A remark on Algorithm AS 181: The W-test for normality. Applied Statistics 44(4), 547–551; Shapiro, S. S. & Wilk, M. B. (1965), Biometrika 52, 591–611.' },
  andersonDarling: { id: 'dagostino-stephens-1986', text: "D'Agostino, R. B. & Stephens, M. A. (1986). Goodness-of-Fit Techniques. Marcel Dekker (Table 4.9, normal case with estimated parameters); NIST e-Handbook 1.3.5.14." },
  moments: { id: 'joanes-gill-1998', text: 'Joanes, D. N. & Gill, C. A. (1998). Comparing measures of sample skewness and kurtosis. The Statistician 47(1), 183–189.' },
  blom: { id: 'blom-1958', text: 'Blom, G. (1958). Statistical Estimates and Transformed Beta-Variables. Wiley (plotting positions (i − 3/8)/(n + 1/4)).' },
  sampleSize: { id: 'nist-7.2.3.2', text: 'NIST/SEMATECH e-Handbook of Statistical Methods, 7.2.3.2 Sample sizes required (chi-square test).' },
  greenwood: { id: 'greenwood-sandomire-1950', text: 'Greenwood, J. A. & Sandomire, M. M. (1950). Sample size required for estimating the standard deviation as a per cent of its true value. JASA 45, 257–260.' },
  capability: { id: 'nist-6.1.6', text: 'NIST/SEMATECH e-Handbook of Statistical Methods, 6.1.6 What is Process Capability?' },
  bissell: { id: 'bissell-1990', text: 'Bissell, A. F. (1990). How reliable is your capability index? Applied Statistics 39(3), 331–340.' },
  howe: { id: 'howe-1969', text: 'Howe, W. G. (1969). Two-sided tolerance limits for normal populations — some improvements. JASA 64, 610–620 (NIST e-Handbook 7.2.6.3).' },
  odehOwen: { id: 'odeh-owen-1980', text: 'Odeh, R. E. & Owen, D. B. (1980). Tables for Normal Tolerance Limits, Sampling Plans, and Screening. Marcel Dekker.' },
  hyndmanFan: { id: 'hyndman-fan-1996', text: 'Hyndman, R. J. & Fan, Y. (1996). Sample quantiles in statistical packages. The American Statistician 50(4), 361–365 (type 7).' },
  chanGolubLeVeque: { id: 'chan-golub-leveque-1983', text: 'Chan, T. F., Golub, G. H. & LeVeque, R. J. (1983). Algorithms for computing the sample variance: analysis and recommendations. The American Statistician 37(3), 242–247.' },
} satisfies Record<string, Citation>;

export const INDEPENDENCE: Assumption = {
  id: 'independence',
  statement: 'The measurements are independent: no drift, trend or carry-over between them. This cannot be checked from the values alone; a run chart in time order helps.',
  status: 'by-design',
};

export function normalityAssumption(what: string): Assumption {
  return {
    id: 'normality',
    statement: `${what} assumes the measurements come from a normal distribution; it is not robust to heavy tails or skewness.`,
    status: 'not-checked',
  };
}

export function percent(level: number): string {
  const p = level * 100;
  return `${Number(p.toPrecision(10))} %`;
}

export function fmt(x: number, digits: number): string {
  return formatSignificant(x, digits);
}

export function withUnit(text: string, unit: string | undefined): string {
  return unit ? `${text} ${unit}` : text;
}

export function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}
