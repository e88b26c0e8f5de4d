import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, ViewEncapsulation, computed, effect, inject, input } from '@angular/core';
import { DOCUMENT } from '@angular/common';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { Title } from '@angular/platform-browser';
import { STANDARD_CAUTION } from '@shared/engine/result';
import type { PublicRevisionAnswer } from '../worksheets/worksheet-api';
import { toApiError } from '../core/api-error';
import { CautionNotice } from '../worksheets/results/caution-notice';
import { WorksheetReadout } from '../worksheets/results/worksheet-readout';
import { formatDate, formatDateTime } from '../worksheets/history/revision-labels';

/**
 * A published revision, for anyone with the link (no sign-in): the read-only worksheet with all
 * results, its revision number, date and hashes, and the cautions. Prints as a clean report.
 * A revoked link and an unknown one each get their own clear page.
 */
@Component({
  selector: 'sp-published-view',
  imports: [MatButton, MatIcon, MatProgressBar, CautionNotice, WorksheetReadout],
  templateUrl: './published-view.html',
  styleUrl: './published-view.scss',
  // Not encapsulated: the print rules must also hide the app's top bar around this page.
  encapsulation: ViewEncapsulation.None,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PublishedView {
  private readonly title = inject(Title);
  private readonly window = inject(DOCUMENT).defaultView;

  /** Route parameter `:token`. */
  readonly token = input.required<string>();

  protected readonly published = httpResource<PublicRevisionAnswer>(() => `/api/public/${encodeURIComponent(this.token())}`);
  protected readonly answer = computed(() => (this.published.hasValue() ? this.published.value() : null));
  protected readonly failure = computed(() => {
    const error = this.published.error();
    if (!error) return null;
    const apiError = toApiError(error);
    if (apiError.status === 410) return { kind: 'revoked' as const, message: apiError.message };
    if (apiError.status === 404) return { kind: 'not-found' as const, message: apiError.message };
    if (apiError.status === 429) return { kind: 'busy' as const, message: apiError.message };
    return { kind: 'other' as const, message: apiError.message };
  });
  /** Cautions the engine attached to steps beyond the standing one, each once. */
  protected readonly stepCautions = computed(() => {
    const a = this.answer();
    if (!a) return [];
    const seen = new Set<string>();
    for (const step of a.revision.results.steps) if (step.caution && step.caution !== STANDARD_CAUTION) seen.add(step.caution);
    return [...seen];
  });

  protected readonly date = formatDate;
  protected readonly when = formatDateTime;

  constructor() {
    effect(() => {
      const a = this.answer();
      const failure = this.failure();
      if (a) this.title.setTitle(`${a.title} · revision ${a.revision.number} · Spreadproof`);
      else if (failure?.kind === 'revoked') this.title.setTitle('Link no longer available · Spreadproof');
      else if (failure?.kind === 'not-found') this.title.setTitle('Published worksheet not found · Spreadproof');
    });
  }

  protected print(): void {
    this.window?.print();
  }
}
