import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { EvaluationResult, StepResult } from '@shared/engine/result';
import type { Step, Worksheet } from '@shared/format/worksheet';
import { CautionNotice } from './caution-notice';
import { StepFindings } from './step-findings';
import { stepKindInfo } from './step-kinds';
import { describeStep, stepLabel, stepTitles } from './step-summary';

interface ReadoutEntry {
  readonly step: Step;
  readonly index: number;
  readonly label: string;
  readonly kindLabel: string;
  readonly icon: string;
  readonly lines: ReturnType<typeof describeStep>;
  readonly result: StepResult | null;
}

/**
 * A whole worksheet read-only: for each step its heading, its parameters in plain words and its
 * findings. For a stored revision, a revision being compared, and the published view.
 */
@Component({
  selector: 'sp-worksheet-readout',
  imports: [StepFindings, CautionNotice],
  template: `
    @if (showCaution()) {
      <sp-caution-notice />
    }
    <ol class="steps" aria-label="Steps">
      @for (entry of entries(); track entry.step.id) {
        <li class="step" [attr.id]="anchorPrefix() + entry.step.id" [attr.data-step-id]="entry.step.id">
          <article [attr.aria-labelledby]="anchorPrefix() + entry.step.id + '-title'">
            <header class="head">
              <span class="material-symbols-outlined kind-icon" aria-hidden="true">{{ entry.icon }}</span>
              <h3 class="title" [attr.id]="anchorPrefix() + entry.step.id + '-title'">
                <span class="number">{{ entry.index + 1 }}.</span> {{ entry.label }}
              </h3>
              <span class="kind">{{ entry.kindLabel }}</span>
            </header>
            @if (entry.lines.length > 0) {
              <dl class="params">
                @for (line of entry.lines; track line.label) {
                  <div><dt>{{ line.label }}</dt><dd>{{ line.value }}</dd></div>
                }
              </dl>
            }
            @if (entry.result; as result) {
              <sp-step-findings [result]="result" [stepTitles]="titles()" [showCaution]="false" />
            } @else {
              <p class="sp-muted">No result for this step.</p>
            }
          </article>
        </li>
      }
    </ol>
  `,
  styles: `
    :host { display: flex; flex-direction: column; gap: var(--sp-gap); }
    .steps { list-style: none; margin: 0; padding: 0; display: flex; flex-direction: column; gap: var(--sp-gap); }
    .step { break-inside: avoid-page; }
    article {
      display: flex; flex-direction: column; gap: 12px;
      padding: 16px; border-radius: var(--mat-sys-corner-large);
      background: var(--mat-sys-surface); border: 1px solid var(--mat-sys-outline-variant);
    }
    .head { display: flex; align-items: center; gap: 10px; flex-wrap: wrap; }
    .kind-icon { color: var(--mat-sys-primary); }
    .title { margin: 0; font: var(--mat-sys-title-medium); flex: 1; min-width: 12ch; overflow-wrap: anywhere; }
    .number { color: var(--mat-sys-on-surface-variant); }
    .kind { font: var(--mat-sys-label-medium); color: var(--mat-sys-on-surface-variant); }
    .params { margin: 0; display: grid; grid-template-columns: minmax(0, 1fr); gap: 2px 16px; font: var(--mat-sys-body-medium); }
    .params div { display: flex; gap: 8px; flex-wrap: wrap; }
    .params dt { color: var(--mat-sys-on-surface-variant); min-width: 14ch; }
    .params dd { margin: 0; overflow-wrap: anywhere; }
    @media print {
      article { border: none; padding: 0; }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class WorksheetReadout {
  readonly document = input.required<Worksheet>();
  readonly results = input.required<EvaluationResult | null>();
  readonly showCaution = input(true);
  /** Prefix of the step anchors' ids (two readouts on one page, as in a comparison, need two). */
  readonly anchorPrefix = input('step-');

  protected readonly titles = computed(() => stepTitles(this.document(), (kind) => stepKindInfo(kind).label));

  protected readonly entries = computed<ReadoutEntry[]>(() => {
    const results = new Map((this.results()?.steps ?? []).map((r) => [r.stepId, r]));
    const titles = this.titles();
    return this.document().steps.map((step, index) => {
      const info = stepKindInfo(step.kind);
      return {
        step,
        index,
        label: stepLabel(step, info.label),
        kindLabel: info.label,
        icon: info.icon,
        lines: describeStep(step, titles),
        result: results.get(step.id) ?? null,
      };
    });
  });
}
