import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, output, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButton } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatFormField, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { Router } from '@angular/router';
import type { StepResult } from '@shared/engine/result';
import type { Worksheet } from '@shared/format/worksheet';
import { Subject, catchError, map, of, switchMap, tap } from 'rxjs';
import { toApiError } from '../../core/api-error';
import { StepFindings } from '../results/step-findings';
import { percentText } from '../results/step-summary';
import { WorksheetApi } from '../worksheet-api';
import { confidenceOf, documentAtLevel, parseConfidence } from './draft-document';

const PRESETS = [0.9, 0.95, 0.99];

/**
 * "What if" for an interval or test step: its result at 90, 95 or 99 % (or a typed level),
 * evaluated through the draft route without changing the worksheet, and "fork at this level",
 * which creates a new worksheet from the revision with the step at that level in one action.
 *
 * Self-contained (it evaluates and forks through WorksheetApi), so read-only revision views can
 * use it too. `activeChange` tells the host when a what-if result is on show, so it can set its
 * own result aside meanwhile.
 */
@Component({
  selector: 'sp-confidence-what-if',
  imports: [
    MatButtonToggleGroup,
    MatButtonToggle,
    MatButton,
    MatIcon,
    MatFormField,
    MatLabel,
    MatSuffix,
    MatInput,
    MatProgressBar,
    StepFindings,
  ],
  templateUrl: './confidence-what-if.html',
  styleUrl: './confidence-what-if.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ConfidenceWhatIf {
  readonly worksheetId = input.required<string>();
  /** The document to vary (the draft in the editor, the revision's document in a read-only view). */
  readonly document = input.required<Worksheet>();
  readonly stepId = input.required<string>();
  /** The revision a fork starts from, and the team it goes to. */
  readonly revisionId = input.required<string>();
  readonly teamId = input.required<string>();
  readonly worksheetTitle = input('');
  readonly canFork = input(false);
  /** Offer "use this level here" (an editor that can change the worksheet). */
  readonly canApply = input(false);
  readonly stepTitles = input<Readonly<Record<string, string>>>({});
  readonly activeChange = output<boolean>();
  readonly applyLevel = output<number>();

  private readonly api = inject(WorksheetApi);
  private readonly router = inject(Router);

  protected readonly presets = PRESETS;
  protected readonly percent = percentText;
  protected readonly step = computed(() => this.document().steps.find((s) => s.id === this.stepId()) ?? null);
  protected readonly ownLevel = computed(() => {
    const step = this.step();
    return step ? confidenceOf(step) : null;
  });
  protected readonly level = signal<number | null>(null);
  protected readonly typed = signal('');
  protected readonly typedError = signal<string | null>(null);
  protected readonly result = signal<StepResult | null>(null);
  protected readonly evaluating = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly forking = signal(false);
  protected readonly toggleValue = computed(() => {
    const level = this.level() ?? this.ownLevel();
    return level !== null && PRESETS.includes(level) ? String(level) : 'other';
  });

  private readonly requests = new Subject<number | null>();

  constructor() {
    this.requests
      .pipe(
        tap((level) => {
          this.level.set(level);
          this.activeChange.emit(level !== null);
          this.error.set(null);
          this.result.set(null);
        }),
        switchMap((level) => {
          if (level === null) return of(null);
          const document = documentAtLevel(this.document(), this.stepId(), level);
          if (!document) return of(null);
          this.evaluating.set(true);
          return this.api.evaluateDraft(this.worksheetId(), document).pipe(
            map((outcome) => outcome.results.steps.find((s) => s.stepId === this.stepId()) ?? null),
            catchError((error: unknown) => {
              this.error.set(toApiError(error).message);
              return of(null);
            }),
            tap({ finalize: () => this.evaluating.set(false) }),
          );
        }),
        takeUntilDestroyed(inject(DestroyRef)),
      )
      .subscribe((result) => this.result.set(result));
  }

  protected choose(value: string): void {
    if (value === 'other') return;
    const level = Number(value);
    this.view(level === this.ownLevel() ? null : level);
  }

  protected typedLevel(text: string): void {
    this.typed.set(text);
    if (text.trim() === '') {
      this.typedError.set(null);
      return;
    }
    const parsed = parseConfidence(text);
    if ('error' in parsed) {
      this.typedError.set(parsed.error);
      return;
    }
    this.typedError.set(null);
    this.view(parsed.level === this.ownLevel() ? null : parsed.level);
  }

  protected back(): void {
    this.typed.set('');
    this.typedError.set(null);
    this.view(null);
  }

  protected apply(): void {
    const level = this.level();
    if (level === null) return;
    this.applyLevel.emit(level);
    this.back();
  }

  protected async fork(): Promise<void> {
    const level = this.level();
    if (level === null || this.forking()) return;
    const document = documentAtLevel(this.document(), this.stepId(), level);
    if (!document) return;
    const at = percentText(level);
    const title = `${this.worksheetTitle() || document.title} at ${at}`.slice(0, 200);
    this.forking.set(true);
    this.error.set(null);
    try {
      const forked = await this.api.fork(this.revisionId(), {
        teamId: this.teamId(),
        title,
        message: `Forked at ${at} confidence for “${this.stepTitles()[this.stepId()] ?? this.stepId()}”`,
        document: { ...document, title },
      });
      await this.router.navigate(['/worksheets', forked.worksheet.id]);
    } catch (error) {
      this.error.set(toApiError(error).message);
    } finally {
      this.forking.set(false);
    }
  }

  private view(level: number | null): void {
    if (level === this.level()) return;
    this.requests.next(level);
  }
}
