import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type {
  Page,
  ReviewRequest,
  ReviewVerdict,
  ReviewVerdictKind,
  RevisionReviewsAnswer,
} from '@shared/api/worksheets';

export type { Page, ReviewRequest, ReviewVerdict, ReviewVerdictKind, RevisionReviewsAnswer };

/** Review requests and verdicts on revisions. Reads are `httpResource`s on the URLs below. */
@Injectable({ providedIn: 'root' })
export class ReviewsApi {
  private readonly http = inject(HttpClient);

  static reviewsUrl(revisionId: string): string {
    return `/api/revisions/${encodeURIComponent(revisionId)}/reviews`;
  }

  static inboxUrl(status: 'open' | 'answered' | 'all' = 'open'): string {
    return `/api/review-requests?status=${status}&pageSize=100`;
  }

  async requestReview(revisionId: string, reviewerId: string, message: string): Promise<ReviewRequest> {
    const { request } = await firstValueFrom(
      this.http.post<{ request: ReviewRequest }>(`/api/revisions/${encodeURIComponent(revisionId)}/review-requests`, {
        reviewerId,
        message,
      }),
    );
    return request;
  }

  /** `contentHash` is the hash the reviewer looked at; the server refuses the verdict if it differs. */
  async giveVerdict(revisionId: string, verdict: ReviewVerdictKind, comment: string, contentHash: string): Promise<ReviewVerdict> {
    const { review } = await firstValueFrom(
      this.http.post<{ review: ReviewVerdict }>(ReviewsApi.reviewsUrl(revisionId), { verdict, comment, contentHash }),
    );
    return review;
  }
}
