import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { Page, WorksheetApi, WorksheetSummary } from '../../worksheets/worksheet-api';
import { toApiError } from '../../core/api-error';
import { formatAge, formatDateTime } from '../../worksheets/history/revision-labels';

/**
 * A team's archived worksheets: read-only, out of the home list, kept with their whole history.
 * Owners restore them.
 */
@Component({
  selector: 'sp-archived-worksheets',
  imports: [RouterLink, MatButton, MatIcon, MatProgressBar],
  template: `
    <section class="sp-panel" aria-labelledby="archived-title" data-testid="archived-worksheets">
      <h2 id="archived-title" class="sp-panel-title">Archived worksheets</h2>
      @if (archived.isLoading() && !archived.hasValue()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading archived worksheets" />
      }
      @if (error(); as message) {
        <p class="sp-alert error" role="alert"><mat-icon aria-hidden="true">error</mat-icon><span>{{ message }}</span></p>
      }
      @if (notice(); as message) {
        <p class="sp-alert info" role="status"><mat-icon aria-hidden="true">check_circle</mat-icon><span>{{ message }}</span></p>
      }
      @if (archived.hasValue()) {
        @if (items().length === 0) {
          <p class="sp-muted none">No archived worksheets. Archived worksheets stay readable here with their full history.</p>
        } @else {
          <ul class="list">
            @for (w of items(); track w.id) {
              <li class="item">
                <mat-icon class="icon" aria-hidden="true">inventory_2</mat-icon>
                <span class="what">
                  <a [routerLink]="['/worksheets', w.id, 'history']">{{ w.title }}</a>
                  <span class="sp-muted small">
                    {{ w.revisionCount }} {{ w.revisionCount === 1 ? 'revision' : 'revisions' }} · last saved
                    <time [attr.datetime]="w.updatedAt" [attr.title]="when(w.updatedAt)">{{ age(w.updatedAt) }}</time>
                  </span>
                </span>
                @if (isOwner()) {
                  <button matButton type="button" (click)="restore(w)" [disabled]="busy() === w.id" [attr.aria-label]="'Restore ' + w.title">
                    <mat-icon>unarchive</mat-icon>
                    Restore
                  </button>
                }
              </li>
            }
          </ul>
          @if (total() > items().length) {
            <p class="sp-muted small">Showing the {{ items().length }} most recent of {{ total() }}.</p>
          }
        }
      }
    </section>
  `,
  styles: `
    .none {
      margin: 0;
    }
    .sp-alert {
      margin-bottom: 12px;
    }
    .list {
      list-style: none;
      margin: 0;
      padding: 0;
    }
    .item {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 4px 12px;
      padding: 8px 0;
      border-top: 1px solid var(--mat-sys-outline-variant);
    }
    .item:first-child {
      border-top: none;
    }
    .icon {
      color: var(--mat-sys-outline);
    }
    .what {
      flex: 1 1 180px;
      min-width: 0;
      display: flex;
      flex-direction: column;
      overflow-wrap: anywhere;
    }
    .small {
      font: var(--mat-sys-body-small);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ArchivedWorksheets {
  private readonly api = inject(WorksheetApi);

  readonly teamId = input.required<string>();
  readonly isOwner = input(false);

  protected readonly archived = httpResource<Page<WorksheetSummary>>(
    () => WorksheetApi.listUrl({ teamId: this.teamId(), archived: true, sort: 'updated', order: 'desc', pageSize: 50 }),
  );
  protected readonly items = computed(() => (this.archived.hasValue() ? this.archived.value().items : []));
  protected readonly total = computed(() => (this.archived.hasValue() ? this.archived.value().total : 0));
  protected readonly loadError = computed(() => {
    const error = this.archived.error();
    return error ? toApiError(error).message : null;
  });
  private readonly actionError = signal<string | null>(null);
  protected readonly error = computed(() => this.actionError() ?? this.loadError());
  protected readonly notice = signal<string | null>(null);
  protected readonly busy = signal<string | null>(null);
  protected readonly age = formatAge;
  protected readonly when = formatDateTime;

  protected async restore(worksheet: WorksheetSummary): Promise<void> {
    this.busy.set(worksheet.id);
    this.actionError.set(null);
    this.notice.set(null);
    try {
      await this.api.restore(worksheet.id);
      this.notice.set(`${worksheet.title} is restored and can be edited again.`);
      this.archived.reload();
    } catch (error) {
      this.actionError.set(`Could not restore ${worksheet.title}: ${toApiError(error).message}`);
    } finally {
      this.busy.set(null);
    }
  }
}
