import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type {
  EvaluationOutcome,
  ForkRequest,
  RecheckAnswer,
  RevisionAnswer,
  TimelineAnswer,
  WorksheetWithHead,
} from '@shared/api/worksheets';
import type { Worksheet } from '@shared/format/worksheet';

/**
 * The revision side of the worksheet API that history, compare and review pages use: the
 * timeline, one revision, re-checking it against the current engine, a draft evaluation for
 * what-if levels, and forking. Reads are `httpResource`s on the URLs below; writes are methods.
 */
@Injectable({ providedIn: 'root' })
export class RevisionsApi {
  private readonly http = inject(HttpClient);

  static timelineUrl(worksheetId: string): string {
    return `/api/worksheets/${encodeURIComponent(worksheetId)}/revisions?pageSize=100`;
  }

  static revisionUrl(revisionId: string): string {
    return `/api/revisions/${encodeURIComponent(revisionId)}`;
  }

  static compareUrl(fromId: string, toId: string): string {
    return `/api/compare?from=${encodeURIComponent(fromId)}&to=${encodeURIComponent(toId)}`;
  }

  timeline(worksheetId: string): Promise<TimelineAnswer> {
    return firstValueFrom(this.http.get<TimelineAnswer>(RevisionsApi.timelineUrl(worksheetId)));
  }

  recheck(revisionId: string): Promise<RecheckAnswer> {
    return firstValueFrom(this.http.post<RecheckAnswer>(`${RevisionsApi.revisionUrl(revisionId)}/recheck`, {}));
  }

  /** Evaluates a document without storing anything (same engine and result shape as a save). */
  evaluateDraft(worksheetId: string, document: Worksheet): Promise<EvaluationOutcome> {
    return firstValueFrom(
      this.http.post<EvaluationOutcome>(`/api/worksheets/${encodeURIComponent(worksheetId)}/evaluate`, { document }),
    );
  }

  /** A new worksheet whose first revision copies `revisionId` (or starts with `request.document`). */
  fork(revisionId: string, request: ForkRequest): Promise<WorksheetWithHead> {
    return firstValueFrom(this.http.post<WorksheetWithHead>(`${RevisionsApi.revisionUrl(revisionId)}/fork`, request));
  }
}

export type { RevisionAnswer, TimelineAnswer };
