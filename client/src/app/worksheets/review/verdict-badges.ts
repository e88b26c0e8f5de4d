import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIcon } from '@angular/material/icon';
import type { ReviewVerdict } from '../worksheet-api';
import { VERDICT_LABEL, formatDateTime, latestVerdicts } from '../history/revision-labels';

/** The verdict that counts for each reviewer of a revision (their latest), as small badges. */
@Component({
  selector: 'sp-verdict-badges',
  imports: [MatIcon],
  template: `
    @for (review of latest(); track review.id) {
      <span
        class="verdict"
        [attr.data-verdict]="review.verdict"
        data-testid="verdict-badge"
        [attr.title]="review.comment ? review.comment : null"
      >
        <mat-icon aria-hidden="true">{{ review.verdict === 'approved' ? 'verified' : 'edit_note' }}</mat-icon>
        <span>{{ label[review.verdict] }}</span>
        <span class="by">· {{ review.reviewer.name }}</span>
        <span class="sp-visually-hidden">, {{ when(review.createdAt) }}</span>
      </span>
    }
  `,
  styles: `
    :host {
      display: inline-flex;
      flex-wrap: wrap;
      gap: 6px;
    }
    .verdict {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      padding: 2px 10px 2px 6px;
      border-radius: var(--mat-sys-corner-full);
      font: var(--mat-sys-label-medium);
      border: 1px solid transparent;
    }
    .verdict[data-verdict='approved'] {
      background: var(--mat-sys-primary-container);
      color: var(--mat-sys-on-primary-container);
    }
    .verdict[data-verdict='changes_requested'] {
      background: var(--sp-accent-container);
      color: var(--sp-on-accent-container);
    }
    .mat-icon {
      width: 16px;
      height: 16px;
      font-size: 16px;
    }
    .by {
      opacity: 0.85;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VerdictBadges {
  readonly reviews = input.required<readonly ReviewVerdict[]>();
  protected readonly latest = computed(() => latestVerdicts(this.reviews()));
  protected readonly label = VERDICT_LABEL;
  protected readonly when = formatDateTime;
}
