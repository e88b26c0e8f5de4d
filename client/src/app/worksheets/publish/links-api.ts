import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { Link, PublishAnswer } from '@shared/api/worksheets';

export type { Link, PublishAnswer };

/** Public read-only links to one revision (owners only). */
@Injectable({ providedIn: 'root' })
export class LinksApi {
  private readonly http = inject(HttpClient);

  static linksUrl(worksheetId: string): string {
    return `/api/worksheets/${encodeURIComponent(worksheetId)}/links`;
  }

  /** The token is in this answer only: the server keeps nothing but its hash. */
  publish(revisionId: string): Promise<PublishAnswer> {
    return firstValueFrom(this.http.post<PublishAnswer>(`/api/revisions/${encodeURIComponent(revisionId)}/links`, {}));
  }

  async revoke(linkId: string): Promise<Link> {
    const { link } = await firstValueFrom(this.http.post<{ link: Link }>(`/api/links/${encodeURIComponent(linkId)}/revoke`, {}));
    return link;
  }
}
