import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';

export type { MailboxMessage, MailboxSummary } from '@shared/api/account';

/** The development mailbox (site admins only). Reads are `httpResource`s on the URLs below. */
@Injectable({ providedIn: 'root' })
export class MailboxApi {
  private readonly http = inject(HttpClient);

  static listUrl(to: string): string {
    const query = to.trim() ? `&to=${encodeURIComponent(to.trim())}` : '';
    return `/api/dev/mailbox?pageSize=100${query}`;
  }

  static messageUrl(id: string): string {
    return `/api/dev/mailbox/${encodeURIComponent(id)}`;
  }

  async clear(): Promise<void> {
    await firstValueFrom(this.http.delete('/api/dev/mailbox'));
  }
}
