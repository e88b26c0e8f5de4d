import { DatePipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { DomSanitizer } from '@angular/platform-browser';
import { RouterLink } from '@angular/router';
import { toApiError } from '../../core/api-error';
import { MailboxApi, type MailboxMessage, type MailboxSummary } from '../mailbox-api';

type View = 'text' | 'html' | 'source';

/** A piece of a message's text: plain, or an address to link. */
interface TextPiece {
  text: string;
  href: string | null;
}

/**
 * The development mailbox (site admins, development only): every message the local mail server
 * received, newest first, and one message in its text, HTML (in a sandboxed frame) and source form.
 */
@Component({
  selector: 'sp-mailbox-page',
  imports: [DatePipe, RouterLink, MatButton, MatIconButton, MatButtonToggleGroup, MatButtonToggle, MatFormField, MatLabel, MatInput, MatIcon, MatProgressBar],
  templateUrl: './mailbox-page.html',
  styleUrl: './mailbox-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MailboxPage {
  private readonly api = inject(MailboxApi);
  private readonly sanitizer = inject(DomSanitizer);

  /** Route parameter `:messageId` (absent on the list alone). */
  readonly messageId = input<string | undefined>();

  protected readonly filter = signal('');
  protected readonly list = httpResource<{ items: MailboxSummary[]; total: number }>(() => MailboxApi.listUrl(this.filter()));
  protected readonly items = computed(() => (this.list.hasValue() ? this.list.value().items : []));
  protected readonly total = computed(() => (this.list.hasValue() ? this.list.value().total : 0));
  protected readonly listError = computed(() => {
    const error = this.list.error();
    return error ? toApiError(error) : null;
  });

  protected readonly detail = httpResource<{ message: MailboxMessage }>(() => {
    const id = this.messageId();
    return id ? MailboxApi.messageUrl(id) : undefined;
  });
  protected readonly message = computed(() => (this.detail.hasValue() ? (this.detail.value()?.message ?? null) : null));
  protected readonly detailError = computed(() => {
    const error = this.detail.error();
    return error ? toApiError(error).message : null;
  });
  protected readonly view = signal<View>('text');
  /** The HTML part was sanitized by the server; the frame is sandboxed (no scripts, no navigation). */
  protected readonly htmlDoc = computed(() => {
    const html = this.message()?.html;
    return html ? this.sanitizer.bypassSecurityTrustHtml(html) : null;
  });
  protected readonly textPieces = computed(() => linkPieces(this.message()?.text ?? ''));
  protected readonly clearing = signal(false);

  protected setFilter(value: string): void {
    this.filter.set(value);
  }

  protected async clear(): Promise<void> {
    this.clearing.set(true);
    try {
      await this.api.clear();
      this.list.reload();
    } finally {
      this.clearing.set(false);
    }
  }
}

/** Splits text into plain pieces and http(s) addresses, so the links in a message can be opened. */
export function linkPieces(text: string): TextPiece[] {
  const pieces: TextPiece[] = [];
  let last = 0;
  for (const match of text.matchAll(/https?:\/\/[^\s<>"]+/g)) {
    const index = match.index ?? 0;
    if (index > last) pieces.push({ text: text.slice(last, index), href: null });
    pieces.push({ text: match[0], href: match[0] });
    last = index + match[0].length;
  }
  if (last < text.length) pieces.push({ text: text.slice(last), href: null });
  return pieces;
}
