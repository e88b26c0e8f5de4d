import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIcon } from '@angular/material/icon';
import type { EvaluationResult, StepResult } from '@shared/engine/result';
import type { Step, Worksheet } from '@shared/format/worksheet';
import { parameterLines } from './step-parameters';
import { stepKindLabel } from './step-kind-labels';

interface SheetRow {
  index: number;
  step: Step;
  result: StepResult | null;
}

/**
 * A worksheet shown read-only: each step with a summary of its parameters and its full results.
 * Used by the revision page and the published view.
 */
@Component({
  selector: 'sp-read-only-sheet',
  imports: [MatIcon],
  templateUrl: './read-only-sheet.html',
  styleUrl: './read-only-sheet.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ReadOnlySheet {
  readonly document = input.required<Worksheet>();
  readonly results = input.required<EvaluationResult>();
  /** Heading level of the step titles (the page's own headings sit above). */
  readonly headingLevel = input<2 | 3>(2);

  protected readonly rows = computed<SheetRow[]>(() => {
    const byId = new Map(this.results().steps.map((r) => [r.stepId, r]));
    return this.document().steps.map((step, index) => ({ index, step, result: byId.get(step.id) ?? null }));
  });

  protected readonly kindLabel = stepKindLabel;
  protected readonly parameters = parameterLines;
}
