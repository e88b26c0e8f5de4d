import { ChangeDetectionStrategy, Component, computed, effect, inject, input } from '@angular/core';
import { MatIcon } from '@angular/material/icon';
import { DomSanitizer, SafeHtml } from '@angular/platform-browser';
import type { StepResult } from '@shared/engine/result';
import { assumptionStatusWords } from './assumption-status';
import { loadStylesheet } from './lazy-libraries';
import { ResultTable } from './result-table';
import { TexFormula } from './tex-formula';
import { ValueList } from './value-list';
import { VegaPlot } from './vega-plot';

/**
 * Everything the engine says about one step (a `StepResult`): the error if it failed, warnings,
 * the values with units, conclusions, the plain-language reading, tables, formulas (symbolic,
 * then with the numbers), the plot, the assumptions with their check status, the method's
 * sources and the standing caution. Read-only; the editor, the revision views and the published
 * view all show results through this component.
 */
@Component({
  selector: 'sp-step-findings',
  imports: [MatIcon, ValueList, ResultTable, TexFormula, VegaPlot],
  templateUrl: './step-findings.html',
  styleUrl: './step-findings.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class StepFindings {
  readonly result = input.required<StepResult>();
  /** Titles of the worksheet's steps by id, to name the step a warning or a check comes from. */
  readonly stepTitles = input<Readonly<Record<string, string>>>({});
  /** Show the standing caution under the result (the published view shows it once instead). */
  readonly showCaution = input(true);
  /** Show the plot (a compact view may leave it out). */
  readonly showPlot = input(true);

  private readonly sanitizer = inject(DomSanitizer);

  protected readonly statusWords = assumptionStatusWords;
  protected readonly plotLabel = computed(() => {
    const title = this.result().plot?.['title'];
    return typeof title === 'string' ? title : `Plot of ${this.result().title}`;
  });
  protected readonly normalityRejected = computed(() =>
    this.result().assumptions.some((a) => a.id === 'normality' && a.status === 'rejected'),
  );
  /**
   * A note's HTML comes from the engine's renderNote: Markdown rendered and sanitized there
   * (sanitize-html, KaTeX with trust off). Angular's own sanitizer would strip the inline styles
   * and MathML that KaTeX needs, so this already-sanitized HTML is marked as trusted.
   */
  protected readonly noteHtml = computed<SafeHtml | null>(() => {
    const html = this.result().html;
    return html === null ? null : this.sanitizer.bypassSecurityTrustHtml(html);
  });

  constructor() {
    // A note's formulas are KaTeX markup already; they need KaTeX's stylesheet and fonts.
    effect(() => {
      if (this.result().html?.includes('katex')) void loadStylesheet('katex.css').catch(() => undefined);
    });
  }

  protected titleOf(stepId: string | undefined): string {
    if (!stepId) return '';
    return this.stepTitles()[stepId] ?? stepId;
  }
}
