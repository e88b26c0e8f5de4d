/**
 * One runner per step kind. A runner reads its step's parameters, fills the StepResult it is
 * given (values, tables, conclusions, formulas, reading, assumptions, warnings, plot, sources) and
 * throws StepFailure for bad input; data-bearing steps return the data later steps may use.
 * See DEVELOPERS.md, "Adding a step kind".
 */
import type { StepKind, StepOfKind } from '../../format/worksheet';
import type { StepResult } from '../result';
import { runCapability } from './capability';
import type { RunContext, StepData } from './context';
import { runData } from './data';
import { runDerivedColumn } from './derived-column';
import { runGroupComparison } from './group-comparison';
import { runNormalityCheck, type NormalityVerdict } from './normality-check';
import { runNote } from './note';
import { runSampleSizePlan } from './sample-size-plan';
import { runSigmaInterval } from './sigma-interval';
import { runSpreadSummary } from './spread-summary';
import { runTargetTest } from './target-test';
import { runTwoSampleRatio } from './two-sample-ratio';

export type RunnerOutput = StepData | NormalityVerdict | null | void;
export type Runner<K extends StepKind> = (step: StepOfKind<K>, ctx: RunContext, result: StepResult) => RunnerOutput;

export const RUNNERS: { [K in StepKind]: Runner<K> } = {
  data: runData,
  'derived-column': runDerivedColumn,
  'spread-summary': runSpreadSummary,
  'sigma-interval': runSigmaInterval,
  'target-test': runTargetTest,
  'two-sample-ratio': runTwoSampleRatio,
  'group-comparison': runGroupComparison,
  'normality-check': runNormalityCheck,
  'sample-size-plan': runSampleSizePlan,
  capability: runCapability,
  note: runNote,
};

/**
 * Step kinds whose results rest on normality, with the robust alternative a failed normality
 * check suggests.
 */
export const NORMALITY_ALTERNATIVES: Partial<Record<StepKind, string>> = {
  'sigma-interval': "Rely on Bonett's interval (in this step) rather than the chi-square interval.",
  'target-test': "Compare the required sigma with Bonett's interval in a sigma-interval step rather than relying on the chi-square test.",
  'two-sample-ratio': 'Rely on the Brown-Forsythe test (in this step) rather than the F test and its interval.',
  'group-comparison': "Rely on the Brown-Forsythe test (in this step) rather than Bartlett's test.",
  capability: 'Capability indices and normal tolerance intervals assume normality; consider a transformation or distribution-free tolerance limits.',
};
