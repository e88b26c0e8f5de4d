import { HttpClient, HttpEventType, HttpParams, provideHttpClient, withInterceptors } from '@angular/common/http';
import { EnvironmentInjector, Injectable, createEnvironmentInjector, inject } from '@angular/core';
import { Observable, filter, firstValueFrom, map } from 'rxjs';

import type {
  AuditEvent,
  CompareAnswer,
  Dataset,
  DatasetRowsAnswer,
  EvaluationOutcome,
  ExampleSummary,
  Link,
  Page,
  PublicRevisionAnswer,
  PublishAnswer,
  RecheckAnswer,
  ReviewRequest,
  ReviewVerdict,
  ReviewVerdictKind,
  RevisionAnswer,
  RevisionReviewsAnswer,
  SaveRevisionAnswer,
  TimelineAnswer,
  UploadAnswer,
  WorksheetDetail,
  WorksheetSummary,
  WorksheetWithHead,
} from '@shared/api/worksheets';
import type { WorksheetInput } from '@shared/format/worksheet';
import { apiInterceptor } from '../core/api-interceptor';

export type * from '@shared/api/worksheets';

/** Query of the worksheet list (`GET /api/worksheets`). */
export interface WorksheetListQuery {
  q?: string;
  teamId?: string;
  archived?: boolean;
  sort?: 'updated' | 'created' | 'title';
  order?: 'asc' | 'desc';
  page?: number;
  pageSize?: number;
}

/** What an upload reports while it runs, then once when it is done. */
export type UploadProgress =
  | { state: 'sending'; loaded: number; total: number | null; fraction: number | null }
  | { state: 'done'; answer: UploadAnswer };

/**
 * The client of the worksheet service (worksheets, revisions, evaluation, datasets, compare,
 * publishing, reviews, audit); the routes and answers are those of shared/api/worksheets.ts.
 *
 * Reads that pages show are also offered as URLs (`WorksheetApi.worksheetUrl(id)`, ...) so that a
 * page can hold them in an `httpResource` that follows its route inputs. Writes are promises;
 * evaluation and uploads are observables because the editor cancels stale evaluations
 * (`switchMap`) and shows upload progress.
 *
 * Errors arrive as `ApiError` (the interceptor converts them): `code`, `message`, `fieldErrors`,
 * and `details` (for example `HeadMovedDetails` on a 409 `head_moved`).
 */
@Injectable({ providedIn: 'root' })
export class WorksheetApi {
  private readonly http = inject(HttpClient);
  private readonly environment = inject(EnvironmentInjector);
  private xhrClient: HttpClient | null = null;

  // ---------------------------------------------------------------------------------------------
  // URLs for httpResource reads
  // ---------------------------------------------------------------------------------------------

  static readonly examplesUrl = '/api/examples';

  static listUrl(query: WorksheetListQuery = {}): string {
    const params: Record<string, string> = {};
    if (query.q) params['q'] = query.q;
    if (query.teamId) params['teamId'] = query.teamId;
    if (query.archived !== undefined) params['archived'] = String(query.archived);
    if (query.sort) params['sort'] = query.sort;
    if (query.order) params['order'] = query.order;
    if (query.page) params['page'] = String(query.page);
    if (query.pageSize) params['pageSize'] = String(query.pageSize);
    const search = new HttpParams({ fromObject: params }).toString();
    return search ? `/api/worksheets?${search}` : '/api/worksheets';
  }

  static worksheetUrl(worksheetId: string): string {
    return `/api/worksheets/${encodeURIComponent(worksheetId)}`;
  }

  static timelineUrl(worksheetId: string, page = 1, pageSize = 100): string {
    return `${WorksheetApi.worksheetUrl(worksheetId)}/revisions?page=${page}&pageSize=${pageSize}`;
  }

  static revisionUrl(revisionId: string): string {
    return `/api/revisions/${encodeURIComponent(revisionId)}`;
  }

  static compareUrl(fromRevisionId: string, toRevisionId: string): string {
    return `/api/compare?from=${encodeURIComponent(fromRevisionId)}&to=${encodeURIComponent(toRevisionId)}`;
  }

  /** Download link of the export file (the browser saves it: `Content-Disposition: attachment`). */
  static exportUrl(worksheetId: string, revisionId?: string): string {
    const base = `${WorksheetApi.worksheetUrl(worksheetId)}/export`;
    return revisionId ? `${base}?revisionId=${encodeURIComponent(revisionId)}` : base;
  }

  static datasetsUrl(teamId: string, page = 1, pageSize = 20): string {
    return `/api/teams/${encodeURIComponent(teamId)}/datasets?page=${page}&pageSize=${pageSize}`;
  }

  static datasetRowsUrl(teamId: string, datasetId: string, offset = 0, limit = 50): string {
    return `/api/teams/${encodeURIComponent(teamId)}/datasets/${encodeURIComponent(datasetId)}?offset=${offset}&limit=${limit}`;
  }

  static linksUrl(worksheetId: string): string {
    return `${WorksheetApi.worksheetUrl(worksheetId)}/links`;
  }

  static publicUrl(token: string): string {
    return `/api/public/${encodeURIComponent(token)}`;
  }

  static reviewsUrl(revisionId: string): string {
    return `${WorksheetApi.revisionUrl(revisionId)}/reviews`;
  }

  static inboxUrl(status: 'open' | 'answered' | 'all' = 'open', page = 1, pageSize = 20): string {
    return `/api/review-requests?status=${status}&page=${page}&pageSize=${pageSize}`;
  }

  static auditUrl(teamId: string, query: { action?: string; objectType?: string; page?: number; pageSize?: number } = {}): string {
    const params: Record<string, string> = {};
    if (query.action) params['action'] = query.action;
    if (query.objectType) params['objectType'] = query.objectType;
    if (query.page) params['page'] = String(query.page);
    if (query.pageSize) params['pageSize'] = String(query.pageSize);
    const search = new HttpParams({ fromObject: params }).toString();
    return `/api/teams/${encodeURIComponent(teamId)}/audit${search ? `?${search}` : ''}`;
  }

  // ---------------------------------------------------------------------------------------------
  // Worksheets
  // ---------------------------------------------------------------------------------------------

  list(query: WorksheetListQuery = {}): Promise<Page<WorksheetSummary>> {
    return firstValueFrom(this.http.get<Page<WorksheetSummary>>(WorksheetApi.listUrl(query)));
  }

  async examples(): Promise<ExampleSummary[]> {
    const { examples } = await firstValueFrom(this.http.get<{ examples: ExampleSummary[] }>(WorksheetApi.examplesUrl));
    return examples;
  }

  createBlank(teamId: string, title?: string): Promise<WorksheetWithHead> {
    return this.create(teamId, title ? { source: 'blank', title } : { source: 'blank' });
  }

  createFromExample(teamId: string, exampleId: string, title?: string): Promise<WorksheetWithHead> {
    return this.create(teamId, title ? { source: 'example', exampleId, title } : { source: 'example', exampleId });
  }

  private create(teamId: string, body: object): Promise<WorksheetWithHead> {
    return firstValueFrom(this.http.post<WorksheetWithHead>(`/api/teams/${encodeURIComponent(teamId)}/worksheets`, body));
  }

  /** Imports an exported worksheet file (`.spreadproof.json`) into a team. */
  importFile(teamId: string, file: Blob, fileName = 'worksheet.spreadproof.json'): Promise<WorksheetWithHead> {
    const form = new FormData();
    form.append('file', file, fileName);
    return firstValueFrom(this.http.post<WorksheetWithHead>(`/api/teams/${encodeURIComponent(teamId)}/worksheets/import`, form));
  }

  get(worksheetId: string): Promise<WorksheetDetail> {
    return firstValueFrom(this.http.get<WorksheetDetail>(WorksheetApi.worksheetUrl(worksheetId)));
  }

  async archive(worksheetId: string): Promise<WorksheetSummary> {
    const { worksheet } = await firstValueFrom(
      this.http.post<{ worksheet: WorksheetSummary }>(`${WorksheetApi.worksheetUrl(worksheetId)}/archive`, {}),
    );
    return worksheet;
  }

  async restore(worksheetId: string): Promise<WorksheetSummary> {
    const { worksheet } = await firstValueFrom(
      this.http.post<{ worksheet: WorksheetSummary }>(`${WorksheetApi.worksheetUrl(worksheetId)}/restore`, {}),
    );
    return worksheet;
  }

  // ---------------------------------------------------------------------------------------------
  // Revisions and evaluation
  // ---------------------------------------------------------------------------------------------

  timeline(worksheetId: string, page = 1, pageSize = 100): Promise<TimelineAnswer> {
    return firstValueFrom(this.http.get<TimelineAnswer>(WorksheetApi.timelineUrl(worksheetId, page, pageSize)));
  }

  /** Saves a new revision. A 409 `head_moved` carries `HeadMovedDetails` in `ApiError.details`. */
  save(worksheetId: string, baseRevisionId: string, document: WorksheetInput, message = ''): Promise<SaveRevisionAnswer> {
    return firstValueFrom(
      this.http.post<SaveRevisionAnswer>(`${WorksheetApi.worksheetUrl(worksheetId)}/revisions`, {
        baseRevisionId,
        document,
        message,
      }),
    );
  }

  /**
   * Evaluates a draft without storing it. An observable so that a newer draft can cancel the
   * request of an older one (unsubscribing aborts the HTTP request).
   */
  evaluateDraft(worksheetId: string, document: WorksheetInput): Observable<EvaluationOutcome> {
    return this.http.post<EvaluationOutcome>(`${WorksheetApi.worksheetUrl(worksheetId)}/evaluate`, { document });
  }

  revision(revisionId: string): Promise<RevisionAnswer> {
    return firstValueFrom(this.http.get<RevisionAnswer>(WorksheetApi.revisionUrl(revisionId)));
  }

  recheck(revisionId: string): Promise<RecheckAnswer> {
    return firstValueFrom(this.http.post<RecheckAnswer>(`${WorksheetApi.revisionUrl(revisionId)}/recheck`, {}));
  }

  /**
   * Forks a revision into `teamId`. With `document`, the fork starts from that document instead of
   * a copy of the revision (a what-if confidence level, or an edit that could not be saved).
   */
  fork(
    revisionId: string,
    request: { teamId: string; title?: string; message?: string; document?: WorksheetInput },
  ): Promise<WorksheetWithHead> {
    return firstValueFrom(this.http.post<WorksheetWithHead>(`${WorksheetApi.revisionUrl(revisionId)}/fork`, request));
  }

  compare(fromRevisionId: string, toRevisionId: string): Promise<CompareAnswer> {
    return firstValueFrom(this.http.get<CompareAnswer>(WorksheetApi.compareUrl(fromRevisionId, toRevisionId)));
  }

  // ---------------------------------------------------------------------------------------------
  // Datasets
  // ---------------------------------------------------------------------------------------------

  /**
   * Uploads a table file to the team, reporting progress. The fetch backend the app uses cannot
   * report upload progress, so uploads go through an XHR-backed client that has the same
   * interceptor (CSRF token, error conversion).
   */
  uploadDataset(teamId: string, file: File): Observable<UploadProgress> {
    // The service detects delimiter, decimal mark and header row itself (no override fields).
    const form = new FormData();
    form.append('file', file, file.name);
    return this.xhr()
      .post<UploadAnswer>(`/api/teams/${encodeURIComponent(teamId)}/datasets`, form, { observe: 'events', reportProgress: true })
      .pipe(
        filter((event) => event.type === HttpEventType.UploadProgress || event.type === HttpEventType.Response),
        map((event): UploadProgress => {
          if (event.type === HttpEventType.Response) return { state: 'done', answer: event.body as UploadAnswer };
          const total = event.type === HttpEventType.UploadProgress && event.total ? event.total : null;
          const loaded = event.type === HttpEventType.UploadProgress ? event.loaded : 0;
          return { state: 'sending', loaded, total, fraction: total ? Math.min(1, loaded / total) : null };
        }),
      );
  }

  datasets(teamId: string, page = 1, pageSize = 20): Promise<Page<Dataset>> {
    return firstValueFrom(this.http.get<Page<Dataset>>(WorksheetApi.datasetsUrl(teamId, page, pageSize)));
  }

  datasetRows(teamId: string, datasetId: string, offset = 0, limit = 50): Observable<DatasetRowsAnswer> {
    return this.http.get<DatasetRowsAnswer>(WorksheetApi.datasetRowsUrl(teamId, datasetId, offset, limit));
  }

  // ---------------------------------------------------------------------------------------------
  // Publishing
  // ---------------------------------------------------------------------------------------------

  publish(revisionId: string): Promise<PublishAnswer> {
    return firstValueFrom(this.http.post<PublishAnswer>(`${WorksheetApi.revisionUrl(revisionId)}/links`, {}));
  }

  async links(worksheetId: string): Promise<Link[]> {
    const { items } = await firstValueFrom(this.http.get<{ items: Link[] }>(WorksheetApi.linksUrl(worksheetId)));
    return items;
  }

  async revokeLink(linkId: string): Promise<Link> {
    const { link } = await firstValueFrom(this.http.post<{ link: Link }>(`/api/links/${encodeURIComponent(linkId)}/revoke`, {}));
    return link;
  }

  publicRevision(token: string): Promise<PublicRevisionAnswer> {
    return firstValueFrom(this.http.get<PublicRevisionAnswer>(WorksheetApi.publicUrl(token)));
  }

  // ---------------------------------------------------------------------------------------------
  // Reviews and audit
  // ---------------------------------------------------------------------------------------------

  async requestReview(revisionId: string, reviewerId: string, message = ''): Promise<ReviewRequest> {
    const { request } = await firstValueFrom(
      this.http.post<{ request: ReviewRequest }>(`${WorksheetApi.revisionUrl(revisionId)}/review-requests`, { reviewerId, message }),
    );
    return request;
  }

  reviews(revisionId: string): Promise<RevisionReviewsAnswer> {
    return firstValueFrom(this.http.get<RevisionReviewsAnswer>(WorksheetApi.reviewsUrl(revisionId)));
  }

  async giveVerdict(
    revisionId: string,
    verdict: ReviewVerdictKind,
    comment: string,
    contentHash?: string,
  ): Promise<ReviewVerdict> {
    const body = contentHash ? { verdict, comment, contentHash } : { verdict, comment };
    const { review } = await firstValueFrom(this.http.post<{ review: ReviewVerdict }>(WorksheetApi.reviewsUrl(revisionId), body));
    return review;
  }

  inbox(status: 'open' | 'answered' | 'all' = 'open', page = 1, pageSize = 20): Promise<Page<ReviewRequest>> {
    return firstValueFrom(this.http.get<Page<ReviewRequest>>(WorksheetApi.inboxUrl(status, page, pageSize)));
  }

  audit(teamId: string, query: { action?: string; objectType?: string; page?: number; pageSize?: number } = {}): Promise<Page<AuditEvent>> {
    return firstValueFrom(this.http.get<Page<AuditEvent>>(WorksheetApi.auditUrl(teamId, query)));
  }

  private xhr(): HttpClient {
    // A child injector with its own HttpClient: no withFetch(), so the XHR backend is used.
    this.xhrClient ??= createEnvironmentInjector([provideHttpClient(withInterceptors([apiInterceptor]))], this.environment).get(
      HttpClient,
    );
    return this.xhrClient;
  }
}
