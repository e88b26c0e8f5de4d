import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, input, signal } from '@angular/core';
import { MatOption } from '@angular/material/core';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatPaginator, PageEvent } from '@angular/material/paginator';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSelect } from '@angular/material/select';
import { RouterLink } from '@angular/router';
import { AuditEvent, Page, WorksheetApi } from '../../worksheets/worksheet-api';
import { toApiError } from '../../core/api-error';
import { formatDateTime } from '../../worksheets/history/revision-labels';
import { AUDIT_ACTIONS, auditActionLabel, auditDetailPairs } from './audit-labels';

/** Who did what in the team, newest first (owners only; the rows themselves are immutable). */
@Component({
  selector: 'sp-audit-trail',
  imports: [RouterLink, MatFormField, MatLabel, MatSelect, MatOption, MatIcon, MatPaginator, MatProgressBar],
  templateUrl: './audit-trail.html',
  styleUrl: './audit-trail.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AuditTrail {
  readonly teamId = input.required<string>();

  protected readonly action = signal<string>('');
  protected readonly page = signal(1);
  protected readonly pageSize = signal(20);

  protected readonly events = httpResource<Page<AuditEvent>>(() => {
    const action = this.action();
    return WorksheetApi.auditUrl(this.teamId(), { page: this.page(), pageSize: this.pageSize(), ...(action ? { action } : {}) });
  });
  protected readonly items = computed(() => (this.events.hasValue() ? this.events.value().items : []));
  protected readonly total = computed(() => (this.events.hasValue() ? this.events.value().total : 0));
  protected readonly loadError = computed(() => {
    const error = this.events.error();
    return error ? toApiError(error).message : null;
  });

  protected readonly actions = AUDIT_ACTIONS;
  protected readonly actionLabel = auditActionLabel;
  protected readonly details = auditDetailPairs;
  protected readonly when = formatDateTime;

  protected filter(action: string): void {
    this.action.set(action);
    this.page.set(1);
  }

  protected changePage(event: PageEvent): void {
    this.pageSize.set(event.pageSize);
    this.page.set(event.pageIndex + 1);
  }
}
