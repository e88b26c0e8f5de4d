import { Clipboard } from '@angular/cdk/clipboard';
import { DOCUMENT } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogActions, MatDialogClose, MatDialogContent, MatDialogTitle } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { toApiError } from '../../core/api-error';
import { formatDateTime } from '../history/revision-labels';
import { Link, WorksheetApi } from '../worksheet-api';

export interface PublishDialogData {
  worksheetId: string;
  worksheetTitle: string;
  revisionId: string;
  revisionNumber: number;
}

/**
 * Sharing one revision read-only: create a public link (shown once, with a copy button), see the
 * worksheet's links, revoke any of them. Owners only (the opener checks the role; the server too).
 */
@Component({
  selector: 'sp-publish-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton, MatIcon, MatProgressBar],
  templateUrl: './publish-dialog.html',
  styleUrl: './publish-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PublishDialog {
  private readonly api = inject(WorksheetApi);
  private readonly clipboard = inject(Clipboard);
  private readonly origin = inject(DOCUMENT).location.origin;

  protected readonly data = inject<PublishDialogData>(MAT_DIALOG_DATA);
  protected readonly links = httpResource<{ items: Link[] }>(() => WorksheetApi.linksUrl(this.data.worksheetId));
  protected readonly linkList = computed(() => (this.links.hasValue() ? this.links.value().items : []));
  protected readonly activeForThisRevision = computed(() =>
    this.linkList().filter((l) => l.revisionId === this.data.revisionId && l.revokedAt === null),
  );
  protected readonly loadError = computed(() => {
    const error = this.links.error();
    return error ? toApiError(error).message : null;
  });

  /** The link made in this dialog (its token is never shown again). */
  protected readonly created = signal<{ linkId: string; url: string } | null>(null);
  protected readonly publishing = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly copied = signal(false);
  protected readonly confirmingRevoke = signal<string | null>(null);
  protected readonly revoking = signal<string | null>(null);
  protected readonly notice = signal<string | null>(null);
  protected readonly when = formatDateTime;

  protected async publish(): Promise<void> {
    if (this.publishing()) return;
    this.publishing.set(true);
    this.error.set(null);
    this.notice.set(null);
    this.copied.set(false);
    try {
      const answer = await this.api.publish(this.data.revisionId);
      this.created.set({ linkId: answer.link.id, url: new URL(answer.url, this.origin).toString() });
      this.links.reload();
    } catch (error) {
      this.error.set(`Could not publish: ${toApiError(error).message}`);
    } finally {
      this.publishing.set(false);
    }
  }

  protected copy(url: string): void {
    this.copied.set(this.clipboard.copy(url));
    if (!this.copied()) this.error.set('The browser refused to copy. Select the link and copy it by hand.');
  }

  protected async revoke(link: Link): Promise<void> {
    this.confirmingRevoke.set(null);
    this.revoking.set(link.id);
    this.error.set(null);
    try {
      await this.api.revokeLink(link.id);
      if (this.created()?.linkId === link.id) this.created.set(null);
      this.notice.set(`The link to revision ${link.revisionNumber} is revoked. It now opens a “no longer available” page.`);
      this.links.reload();
    } catch (error) {
      this.error.set(`Could not revoke the link: ${toApiError(error).message}`);
    } finally {
      this.revoking.set(null);
    }
  }
}
