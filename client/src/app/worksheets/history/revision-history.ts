import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatDialog } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { toApiError } from '../../core/api-error';
import { roleAtLeast } from '../../core/roles';
import { PublishDialog, PublishDialogData } from '../publish/publish-dialog';
import { VerdictBadges } from '../review/verdict-badges';
import { RevisionSummary, TimelineAnswer, WorksheetApi, WorksheetDetail } from '../worksheet-api';
import { formatAge, formatDateTime, shortHash } from './revision-labels';

/**
 * The timeline of a worksheet: every saved revision, newest first, with its author, time, message,
 * short hash, review verdicts, whether it is published, and the forks made from it. Pick two to
 * compare; open any one read-only.
 */
@Component({
  selector: 'sp-revision-history',
  imports: [RouterLink, MatButton, MatCheckbox, MatIcon, MatProgressBar, VerdictBadges],
  templateUrl: './revision-history.html',
  styleUrl: './revision-history.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RevisionHistory {
  private readonly dialog = inject(MatDialog);
  private readonly router = inject(Router);

  /** Route parameter `:worksheetId`. */
  readonly worksheetId = input.required<string>();

  protected readonly worksheet = httpResource<WorksheetDetail>(() => WorksheetApi.worksheetUrl(this.worksheetId()));
  protected readonly timeline = httpResource<TimelineAnswer>(() => WorksheetApi.timelineUrl(this.worksheetId()));

  protected readonly detail = computed(() => (this.worksheet.hasValue() ? this.worksheet.value() : null));
  protected readonly revisions = computed(() => (this.timeline.hasValue() ? this.timeline.value().items : []));
  protected readonly headId = computed(() => this.detail()?.worksheet.head.id ?? null);
  protected readonly isOwner = computed(() => roleAtLeast(this.detail()?.myRole, 'owner'));
  protected readonly loadError = computed(() => {
    const error = this.worksheet.error() ?? this.timeline.error();
    return error ? toApiError(error) : null;
  });

  /** Forks made from each revision of this worksheet (in teams the reader belongs to). */
  protected readonly forksByRevision = computed(() => {
    const map = new Map<string, TimelineAnswer['forks']>();
    if (!this.timeline.hasValue()) return map;
    for (const fork of this.timeline.value().forks) {
      map.set(fork.originRevisionId, [...(map.get(fork.originRevisionId) ?? []), fork]);
    }
    return map;
  });

  /** Revision ids picked for comparison, in the order they were picked (at most two). */
  protected readonly picked = signal<string[]>([]);
  protected readonly pickedRevisions = computed(() => {
    const byId = new Map(this.revisions().map((r) => [r.id, r]));
    return this.picked()
      .map((id) => byId.get(id))
      .filter((r): r is RevisionSummary => r !== undefined)
      .sort((a, b) => a.number - b.number);
  });

  protected readonly shortHash = shortHash;
  protected readonly age = formatAge;
  protected readonly when = formatDateTime;

  protected togglePick(revision: RevisionSummary, checked: boolean): void {
    this.picked.update((ids) => {
      const rest = ids.filter((id) => id !== revision.id);
      // A third pick replaces the older of the two, so the box the user just ticked stays ticked.
      return checked ? [...rest, revision.id].slice(-2) : rest;
    });
  }

  protected isPicked(revision: RevisionSummary): boolean {
    return this.picked().includes(revision.id);
  }

  protected async comparePicked(): Promise<void> {
    const [older, newer] = this.pickedRevisions();
    if (!older || !newer) return;
    await this.router.navigate(['/compare'], { queryParams: { from: older.id, to: newer.id } });
  }

  protected openPublish(revision: RevisionSummary): void {
    const detail = this.detail();
    if (!detail) return;
    const data: PublishDialogData = {
      worksheetId: detail.worksheet.id,
      worksheetTitle: detail.worksheet.title,
      revisionId: revision.id,
      revisionNumber: revision.number,
    };
    this.dialog
      .open(PublishDialog, { data, width: '600px', maxWidth: 'calc(100vw - 24px)', autoFocus: 'first-tabbable' })
      .afterClosed()
      .subscribe(() => this.timeline.reload());
  }
}
