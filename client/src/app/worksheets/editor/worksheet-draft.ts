import { DestroyRef, Injectable, computed, effect, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { Observable, catchError, debounceTime, distinctUntilChanged, filter, map, of, retry, switchMap, tap, throwError, timer } from 'rxjs';
import type { EvaluationResult, StepResult } from '@shared/engine/result';
import type { Step, StepKind, Worksheet } from '@shared/format/worksheet';
import { ApiError, toApiError } from '../../core/api-error';
import { roleAtLeast } from '../../core/roles';
import { stepKindInfo } from '../results/step-kinds';
import { stepLabel, stepTitles } from '../results/step-summary';
import type { EvaluationOutcome, HeadMovedDetails, Revision, WorksheetSummary } from '../worksheet-api';
import { WorksheetApi } from '../worksheet-api';
import {
  ColumnInfo,
  DataStepInfo,
  clone,
  createStep,
  dataStepsBefore,
  duplicateStep,
  insertStep,
  moveStep,
  removeStep,
  replaceStep,
  stableStringify,
} from './draft-document';
import { DraftStorage, StoredDraft } from './draft-storage';

/** How long the editor waits after the last edit before it evaluates the draft. */
export const EVALUATION_DEBOUNCE_MS = 400;
/** Evaluations that take longer than this show a progress bar. */
export const SLOW_EVALUATION_MS = 500;

export type PreviewState = 'saved' | 'waiting' | 'running' | 'current' | 'failed';

interface Preview {
  key: string;
  outcome: EvaluationOutcome;
}

/** A save refused because someone saved a newer revision first (409 `head_moved`). */
export class HeadMovedError extends Error {
  constructor(
    readonly details: HeadMovedDetails,
    message: string,
  ) {
    super(message);
  }
}

/**
 * The state of one worksheet being edited: the revision the draft is based on, the draft
 * document, and the live preview of its results.
 *
 * Every edit replaces `document`. The draft is kept in localStorage (by worksheet and base
 * revision) and evaluated through the draft route once edits pause: a newer draft cancels the
 * request of an older one (`switchMap`), and the results shown are marked as an unsaved preview
 * until the draft is saved.
 */
@Injectable()
export class WorksheetDraft {
  private readonly api = inject(WorksheetApi);
  private readonly storage = new DraftStorage();

  readonly worksheet = signal<WorksheetSummary | null>(null);
  readonly myRole = signal<string | null>(null);
  /** The revision the draft is based on (the head when the editor opened it or last saved). */
  readonly base = signal<Revision | null>(null);
  readonly document = signal<Worksheet | null>(null);
  readonly loadError = signal<ApiError | null>(null);
  /** Set when the editor restored an unsaved draft from this browser. */
  readonly restoredAt = signal<string | null>(null);
  /** Unsaved drafts of this worksheet based on an older revision. */
  readonly olderDrafts = signal<StoredDraft[]>([]);
  readonly storageFailed = signal(false);

  private readonly preview = signal<Preview | null>(null);
  readonly previewState = signal<PreviewState>('saved');
  readonly previewError = signal<ApiError | null>(null);
  /** True while an evaluation has been running for more than SLOW_EVALUATION_MS. */
  readonly slowEvaluation = signal(false);
  readonly lastElapsedMs = signal<number | null>(null);

  private readonly savedKey = computed(() => {
    const base = this.base();
    return base ? stableStringify(base.document) : '';
  });
  private readonly draftKey = computed(() => {
    const document = this.document();
    return document ? stableStringify(document) : '';
  });

  /** The draft differs from the revision it is based on. */
  readonly dirty = computed(() => this.document() !== null && this.draftKey() !== this.savedKey());
  readonly canEdit = computed(() => roleAtLeast(this.myRole(), 'editor') && this.worksheet()?.archived === false);

  /** Results to show: the saved ones while the draft is unchanged, else the latest preview. */
  readonly results = computed<EvaluationResult | null>(() => {
    if (!this.dirty()) return this.base()?.results ?? null;
    return this.preview()?.outcome.results ?? this.base()?.results ?? null;
  });
  /** The results shown belong to the current draft (not to an older state of it). */
  readonly resultsCurrent = computed(() => !this.dirty() || this.preview()?.key === this.draftKey());

  readonly resultsByStep = computed(() => new Map((this.results()?.steps ?? []).map((r) => [r.stepId, r] as const)));
  readonly titles = computed(() => {
    const document = this.document();
    return document ? stepTitles(document, (kind) => stepKindInfo(kind).label) : {};
  });

  constructor() {
    this.liveEvaluation();
    // Keep every change of the draft in this browser until it is saved or discarded.
    effect(() => {
      const document = this.document();
      const base = this.base();
      const worksheet = this.worksheet();
      if (!document || !base || !worksheet) return;
      if (this.dirty()) {
        this.storageFailed.set(
          !this.storage.save({ worksheetId: worksheet.id, baseRevisionId: base.id, document, savedAt: new Date().toISOString() }),
        );
      } else {
        this.storage.remove(worksheet.id, base.id);
      }
    });
  }

  // -------------------------------------------------------------------------------------------
  // Loading
  // -------------------------------------------------------------------------------------------

  async load(worksheetId: string): Promise<void> {
    this.loadError.set(null);
    if (this.worksheet()?.id !== worksheetId) {
      // Another worksheet (a fork just made, say): show nothing of the previous one meanwhile.
      this.document.set(null);
      this.base.set(null);
      this.worksheet.set(null);
      this.restoredAt.set(null);
      this.olderDrafts.set([]);
    }
    try {
      const detail = await this.api.get(worksheetId);
      this.worksheet.set(detail.worksheet);
      this.myRole.set(detail.myRole);
      this.preview.set(null);
      this.previewError.set(null);
      this.base.set(detail.head);
      const stored = this.storage.load(worksheetId, detail.head.id);
      if (stored && stableStringify(stored.document) !== stableStringify(detail.head.document)) {
        this.document.set(stored.document);
        this.restoredAt.set(stored.savedAt);
      } else {
        this.document.set(clone(detail.head.document));
        this.restoredAt.set(null);
      }
      this.olderDrafts.set(this.storage.others(worksheetId, detail.head.id));
    } catch (error) {
      this.loadError.set(toApiError(error));
    }
  }

  /** Drops the unsaved draft and shows the base revision again. */
  discardDraft(): void {
    const base = this.base();
    if (!base) return;
    this.document.set(clone(base.document));
    this.restoredAt.set(null);
  }

  forgetOlderDraft(draft: StoredDraft): void {
    this.storage.remove(draft.worksheetId, draft.baseRevisionId);
    this.olderDrafts.update((list) => list.filter((d) => d !== draft));
  }

  // -------------------------------------------------------------------------------------------
  // Edits
  // -------------------------------------------------------------------------------------------

  private edit(change: (document: Worksheet) => Worksheet): void {
    const document = this.document();
    if (!document || !this.canEdit()) return;
    this.document.set(change(document));
  }

  setTitle(title: string): void {
    this.edit((d) => ({ ...d, title }));
  }

  updateStep(step: Step): void {
    this.edit((d) => replaceStep(d, step));
  }

  /** Adds a step of `kind` at `index` (default: the end) and returns its id. */
  addStep(kind: StepKind, index?: number): string | null {
    const document = this.document();
    if (!document || !this.canEdit()) return null;
    const at = index ?? document.steps.length;
    const step = createStep(kind, document, this.dataStepsBefore(at));
    this.document.set(insertStep(document, step, at));
    return step.id;
  }

  insertStep(step: Step, index: number): void {
    this.edit((d) => insertStep(d, step, index));
  }

  duplicateStep(stepId: string): string | null {
    const document = this.document();
    if (!document || !this.canEdit()) return null;
    const step = document.steps.find((s) => s.id === stepId);
    if (!step) return null;
    const result = duplicateStep(document, stepId, stepKindInfo(step.kind).label);
    if (!result) return null;
    this.document.set(result.document);
    return result.copy.id;
  }

  removeStep(stepId: string): void {
    this.edit((d) => removeStep(d, stepId));
  }

  moveStep(fromIndex: number, toIndex: number): void {
    this.edit((d) => moveStep(d, fromIndex, toIndex));
  }

  replaceDocument(document: Worksheet): void {
    this.edit(() => document);
  }

  // -------------------------------------------------------------------------------------------
  // What the forms need
  // -------------------------------------------------------------------------------------------

  resultOf(stepId: string): StepResult | null {
    return this.resultsByStep().get(stepId) ?? null;
  }

  /** Columns the engine reported for a data or derived-column step in the results shown. */
  knownColumns(stepId: string): ColumnInfo[] | null {
    const data = this.resultOf(stepId)?.data;
    if (!data || data.columns.length === 0) return null;
    return data.columns.map((c) => (c.unit ? { name: c.name, type: c.type, unit: c.unit } : { name: c.name, type: c.type }));
  }

  dataStepsBefore(index: number): DataStepInfo[] {
    const document = this.document();
    if (!document) return [];
    return dataStepsBefore(document, index, (id) => this.knownColumns(id), (step) => stepLabel(step, stepKindInfo(step.kind).label));
  }

  // -------------------------------------------------------------------------------------------
  // Saving and forking
  // -------------------------------------------------------------------------------------------

  /** Saves the draft as a new revision. Throws `HeadMovedError` when the head has moved. */
  async save(message: string): Promise<Revision> {
    const worksheet = this.worksheet();
    const base = this.base();
    const document = this.document();
    if (!worksheet || !base || !document) throw new Error('Nothing to save.');
    try {
      const answer = await this.api.save(worksheet.id, base.id, document, message);
      this.storage.remove(worksheet.id, base.id);
      this.worksheet.set(answer.worksheet);
      this.base.set(answer.revision);
      this.preview.set(null);
      this.previewError.set(null);
      this.restoredAt.set(null);
      // Only replace the draft if nothing was edited while the save was on its way.
      if (this.document() === document) this.document.set(clone(answer.revision.document));
      return answer.revision;
    } catch (error) {
      const apiError = toApiError(error);
      if (apiError.status === 409 && apiError.code === 'head_moved' && isHeadMovedDetails(apiError.details)) {
        throw new HeadMovedError(apiError.details, apiError.message);
      }
      throw apiError;
    }
  }

  /** Keeps `document` (default: the draft) as a new worksheet forked from the base revision. */
  async fork(options: { document?: Worksheet; title?: string; message?: string } = {}): Promise<WorksheetSummary> {
    const worksheet = this.worksheet();
    const base = this.base();
    const document = options.document ?? this.document();
    if (!worksheet || !base || !document) throw new Error('Nothing to fork.');
    const request: { teamId: string; document: Worksheet; title?: string; message?: string } = { teamId: worksheet.teamId, document };
    if (options.title) request.title = options.title;
    if (options.message) request.message = options.message;
    const answer = await this.api.fork(base.id, request);
    if (!options.document) this.storage.remove(worksheet.id, base.id);
    return answer.worksheet;
  }

  /** Forgets the draft and loads the newest revision. */
  async reloadLatest(): Promise<void> {
    const worksheet = this.worksheet();
    const base = this.base();
    if (!worksheet) return;
    if (base) this.storage.remove(worksheet.id, base.id);
    this.document.set(null);
    await this.load(worksheet.id);
  }

  /** Evaluates any document of this worksheet (the what-if views use it). */
  evaluate(document: Worksheet): Observable<EvaluationOutcome> {
    const worksheet = this.worksheet();
    if (!worksheet) return of();
    return this.api.evaluateDraft(worksheet.id, document);
  }

  // -------------------------------------------------------------------------------------------
  // Live evaluation
  // -------------------------------------------------------------------------------------------

  private liveEvaluation(): void {
    const destroyRef = inject(DestroyRef);
    const draft = computed(() => ({ document: this.document(), key: this.draftKey() }));
    toObservable(draft)
      .pipe(
        distinctUntilChanged((a, b) => a.key === b.key),
        tap(({ document }) => {
          if (!document) return;
          this.previewState.set(this.dirty() ? (this.preview()?.key === this.draftKey() ? 'current' : 'waiting') : 'saved');
        }),
        debounceTime(EVALUATION_DEBOUNCE_MS),
        filter(({ document }) => document !== null),
        switchMap(({ document, key }) => {
          const worksheet = this.worksheet();
          if (!worksheet || !this.dirty() || this.preview()?.key === key) {
            this.slowEvaluation.set(false);
            if (!this.dirty()) this.previewState.set('saved');
            return of(null);
          }
          this.previewState.set('running');
          this.previewError.set(null);
          // Shows progress only for evaluations that take noticeably long.
          const slow = timer(SLOW_EVALUATION_MS).subscribe(() => this.slowEvaluation.set(true));
          return this.api.evaluateDraft(worksheet.id, document as Worksheet).pipe(
            // All evaluation workers busy (503 evaluation_busy): try again shortly, twice.
            retry({
              count: 2,
              delay: (error: unknown, attempt) =>
                toApiError(error).code === 'evaluation_busy' ? timer(1000 * attempt) : throwError(() => error),
            }),
            map((outcome) => ({ key, outcome, error: null as ApiError | null })),
            catchError((error: unknown) => of({ key, outcome: null, error: toApiError(error) })),
            tap({
              finalize: () => {
                slow.unsubscribe();
                this.slowEvaluation.set(false);
              },
            }),
          );
        }),
        takeUntilDestroyed(destroyRef),
      )
      .subscribe((answer) => {
        if (!answer) return;
        if (answer.outcome) {
          this.preview.set({ key: answer.key, outcome: answer.outcome });
          this.lastElapsedMs.set(answer.outcome.elapsedMs);
          this.previewState.set(answer.key === this.draftKey() ? 'current' : 'waiting');
        } else {
          this.previewError.set(answer.error);
          this.previewState.set('failed');
        }
      });
  }
}

function isHeadMovedDetails(value: unknown): value is HeadMovedDetails {
  return (
    typeof value === 'object' &&
    value !== null &&
    typeof (value as HeadMovedDetails).baseRevisionId === 'string' &&
    typeof (value as HeadMovedDetails).head === 'object'
  );
}
