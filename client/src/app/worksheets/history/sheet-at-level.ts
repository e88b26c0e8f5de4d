/**
 * "What if the worksheet were read at another confidence level?" — the document a revision would
 * have with every interval and test step set to one level, for a draft evaluation (nothing is saved)
 * and for "fork at this level". Pure: no Angular, unit-testable under mocha.
 *
 * What a level means per step kind:
 * - sigma interval: the interval at that level only (`levels: [level]`);
 * - target test, group comparison: significance level alpha = 1 − level;
 * - two-sample ratio: interval at `level`, test at alpha = 1 − level;
 * - capability: Cp/Cpk bounds at `level` (a tolerance interval keeps its own coverage and confidence).
 * Normality checks keep their alpha: they judge an assumption, not the quantity the user states.
 */
import type { Step, Worksheet } from '@shared/format/worksheet';

export const PRESET_LEVELS: readonly number[] = [0.9, 0.95, 0.99];

/** Step kinds whose results depend on a confidence (or significance) level the user states. */
export const LEVEL_STEP_KINDS: ReadonlySet<Step['kind']> = new Set([
  'sigma-interval',
  'target-test',
  'two-sample-ratio',
  'group-comparison',
  'capability',
]);

/** 1 − level without binary noise (1 − 0.99 = 0.010000000000000009). */
export function alphaFor(level: number): number {
  return Number((1 - level).toFixed(12));
}

export function isValidLevel(level: number): boolean {
  return Number.isFinite(level) && level > 0 && level < 1;
}

/** Parses what a user typed as a level: "99", "99 %", "99.5%" or "0.995" → 0.995; null when unusable. */
export function parseLevel(text: string): number | null {
  const cleaned = text.trim().replace(',', '.').replace(/\s*%$/, '');
  if (!/^\d+(\.\d+)?$/.test(cleaned)) return null;
  const value = Number(cleaned);
  const level = value >= 1 ? value / 100 : value;
  const rounded = Number(level.toFixed(12));
  return isValidLevel(rounded) ? rounded : null;
}

export function hasLevelSteps(document: Worksheet): boolean {
  return document.steps.some((step) => LEVEL_STEP_KINDS.has(step.kind));
}

/**
 * The confidence levels the document states, as a sorted list (a sigma interval's levels, 1 − alpha
 * of a test, ...). Used to tell "as saved" from a what-if level.
 */
export function statedLevels(document: Worksheet): number[] {
  const levels = new Set<number>();
  for (const step of document.steps) {
    switch (step.kind) {
      case 'sigma-interval':
        step.params.levels.forEach((l) => levels.add(l));
        break;
      case 'target-test':
      case 'group-comparison':
        levels.add(alphaFor(step.params.alpha));
        break;
      case 'two-sample-ratio':
        levels.add(step.params.level);
        levels.add(alphaFor(step.params.alpha));
        break;
      case 'capability':
        levels.add(step.params.level);
        break;
      default:
        break;
    }
  }
  return [...levels].sort((a, b) => a - b);
}

/** A copy of `document` with every level-bearing step at `level`; other steps are untouched. */
export function documentAtLevel(document: Worksheet, level: number): Worksheet {
  if (!isValidLevel(level)) throw new RangeError(`A confidence level lies strictly between 0 and 1, not ${level}.`);
  const alpha = alphaFor(level);
  const steps = document.steps.map((step): Step => {
    switch (step.kind) {
      case 'sigma-interval':
        return { ...step, params: { ...step.params, levels: [level] } };
      case 'target-test':
        return { ...step, params: { ...step.params, alpha } };
      case 'group-comparison':
        return { ...step, params: { ...step.params, alpha } };
      case 'two-sample-ratio':
        return { ...step, params: { ...step.params, level, alpha } };
      case 'capability':
        return { ...step, params: { ...step.params, level } };
      default:
        return step;
    }
  });
  return { ...document, steps };
}
