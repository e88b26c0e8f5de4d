/** Helpers for the steps that work on exactly one sample. */
import type { Source } from '../../format/worksheet';
import { StepFailure, resolveSource, type ResolveOptions, type ResolvedSample, type RunContext } from './context';

export function resolveOne(ctx: RunContext, source: Source, what: string, options: ResolveOptions = {}): ResolvedSample {
  const samples = resolveSource(ctx, source, options);
  if (samples.length !== 1) {
    throw new StepFailure('invalid-parameter', `${options.field ?? 'params.source'}.groups`, `${what} works on one sample, but the source gives ${samples.length} groups (${samples.slice(0, 10).map((s) => `"${s.label}"`).join(', ')}); pick one with "groups": ["…"]`);
  }
  return samples[0];
}
