/** Note step: Markdown with KaTeX math, rendered to sanitized HTML (KaTeX with trust off). */
import type { StepOfKind } from '../../format/worksheet';
import { NoteTooLongError, renderNote } from '../note';
import type { StepResult } from '../result';
import { StepFailure } from './context';

export function runNote(step: StepOfKind<'note'>, _ctx: unknown, result: StepResult): void {
  try {
    result.html = renderNote(step.params.markdown);
  } catch (e) {
    if (e instanceof NoteTooLongError) throw new StepFailure('invalid-parameter', 'params.markdown', e.message);
    throw e;
  }
  const words = step.params.markdown.trim().split(/\s+/).filter(Boolean).length;
  result.reading = words ? `A note of ${words} word${words === 1 ? '' : 's'}.` : 'An empty note.';
}
