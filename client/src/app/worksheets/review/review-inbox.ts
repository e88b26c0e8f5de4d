import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, signal } from '@angular/core';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { toApiError } from '../../core/api-error';
import { formatAge, formatDateTime } from '../history/revision-labels';
import { Page, ReviewRequest, WorksheetApi } from '../worksheet-api';

/** Review requests addressed to me: open ones first; answered ones on demand. */
@Component({
  selector: 'sp-review-inbox',
  imports: [RouterLink, MatButtonToggleGroup, MatButtonToggle, MatIcon, MatProgressBar],
  template: `
    <div class="sp-page">
      <header class="head">
        <h1 class="sp-page-title">Reviews asked of you</h1>
        <mat-button-toggle-group [value]="status()" (change)="status.set($event.value)" aria-label="Which requests to show" hideSingleSelectionIndicator>
          <mat-button-toggle value="open">Waiting</mat-button-toggle>
          <mat-button-toggle value="answered">Answered</mat-button-toggle>
          <mat-button-toggle value="all">All</mat-button-toggle>
        </mat-button-toggle-group>
      </header>

      @if (inbox.isLoading() && !inbox.hasValue()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading review requests" />
      }
      @if (loadError(); as error) {
        <p class="sp-alert error" role="alert"><mat-icon aria-hidden="true">error</mat-icon><span>{{ error }}</span></p>
      } @else if (inbox.hasValue()) {
        @if (items().length === 0) {
          <section class="sp-panel empty">
            <mat-icon aria-hidden="true">inbox</mat-icon>
            <p>{{ status() === 'open' ? 'No review is waiting for you.' : 'Nothing here yet.' }}</p>
          </section>
        } @else {
          <ul class="requests">
            @for (r of items(); track r.id) {
              <li class="sp-panel request" [attr.data-status]="r.status">
                <a class="title" [routerLink]="['/revisions', r.revisionId]" fragment="review">{{ r.worksheetTitle }}, revision {{ r.revisionNumber }}</a>
                <span class="sp-muted">
                  Asked by {{ r.requestedBy.name }},
                  <time [attr.datetime]="r.createdAt" [attr.title]="when(r.createdAt)">{{ age(r.createdAt) }}</time>
                  · {{ r.status === 'open' ? 'waiting for your verdict' : 'answered' }}
                </span>
                @if (r.message) {
                  <span class="message">“{{ r.message }}”</span>
                }
              </li>
            }
          </ul>
        }
      }
    </div>
  `,
  styles: `
    .head {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      justify-content: space-between;
      gap: 12px;
    }
    .requests {
      list-style: none;
      margin: 0;
      padding: 0;
      display: flex;
      flex-direction: column;
      gap: 8px;
    }
    .request {
      display: flex;
      flex-direction: column;
      gap: 4px;
      padding: 12px 16px;
    }
    .request[data-status='open'] {
      border-inline-start: 4px solid var(--mat-sys-primary);
    }
    .title {
      font: var(--mat-sys-title-medium);
      overflow-wrap: anywhere;
    }
    .message {
      font-style: italic;
    }
    .empty {
      display: flex;
      flex-direction: column;
      align-items: center;
      gap: 4px;
      color: var(--mat-sys-on-surface-variant);
    }
    .empty p {
      margin: 0;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ReviewInbox {
  protected readonly status = signal<'open' | 'answered' | 'all'>('open');
  protected readonly inbox = httpResource<Page<ReviewRequest>>(() => WorksheetApi.inboxUrl(this.status(), 1, 100));
  protected readonly items = computed(() => (this.inbox.hasValue() ? this.inbox.value().items : []));
  protected readonly loadError = computed(() => {
    const error = this.inbox.error();
    return error ? toApiError(error).message : null;
  });
  protected readonly age = formatAge;
  protected readonly when = formatDateTime;
}
