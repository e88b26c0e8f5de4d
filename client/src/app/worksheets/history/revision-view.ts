import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, resource, signal } from '@angular/core';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatDialog } from '@angular/material/dialog';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatMenu, MatMenuItem, MatMenuTrigger } from '@angular/material/menu';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatTooltip } from '@angular/material/tooltip';
import { Router, RouterLink } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { ApiError, toApiError } from '../../core/api-error';
import { roleAtLeast } from '../../core/roles';
import { TeamSummary, Teams } from '../../teams/teams';
import { PublishDialog, PublishDialogData } from '../publish/publish-dialog';
import { ReviewPanel } from '../review/review-panel';
import { VerdictBadges } from '../review/verdict-badges';
import { PRESET_LEVELS, documentAtLevel, hasLevelSteps, parseLevel, statedLevels } from './sheet-at-level';
import { WorksheetReadout } from '../results/worksheet-readout';
import { EvaluationOutcome, RecheckAnswer, RevisionAnswer, WorksheetApi } from '../worksheet-api';
import { formatDateTime, percentText, relativeChangeText, shortHash } from './revision-labels';

type LevelChoice = 'saved' | 'other' | `${number}`;

/**
 * One revision, read-only, exactly as saved: its steps and stored results, who saved it and when,
 * its hashes and engine version, review verdicts. From here: re-check it against the current
 * engine (drift is shown, never written back), read it at another confidence level (a draft
 * evaluation, nothing saved), fork it (at that level), compare it, review it, publish it.
 */
@Component({
  selector: 'sp-revision-view',
  imports: [
    RouterLink,
    MatButton,
    MatIconButton,
    MatButtonToggleGroup,
    MatButtonToggle,
    MatFormField,
    MatLabel,
    MatError,
    MatInput,
    MatIcon,
    MatMenu,
    MatMenuItem,
    MatMenuTrigger,
    MatProgressBar,
    MatTooltip,
    WorksheetReadout,
    ReviewPanel,
    VerdictBadges,
  ],
  templateUrl: './revision-view.html',
  styleUrl: './revision-view.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RevisionView {
  private readonly api = inject(WorksheetApi);
  private readonly dialog = inject(MatDialog);
  private readonly router = inject(Router);

  /** Route parameter `:revisionId`. */
  readonly revisionId = input.required<string>();

  protected readonly revision = httpResource<RevisionAnswer>(() => WorksheetApi.revisionUrl(this.revisionId()));
  private readonly teams = httpResource<{ teams: TeamSummary[] }>(() => Teams.listUrl);

  protected readonly answer = computed(() => (this.revision.hasValue() ? this.revision.value() : null));
  protected readonly loadError = computed(() => {
    const error = this.revision.error();
    return error ? toApiError(error) : null;
  });
  protected readonly myRole = computed(() => {
    const a = this.answer();
    if (!a || !this.teams.hasValue()) return null;
    return this.teams.value().teams.find((t) => t.id === a.worksheet.teamId)?.role ?? null;
  });
  protected readonly isOwner = computed(() => roleAtLeast(this.myRole(), 'owner'));
  protected readonly canEdit = computed(() => roleAtLeast(this.myRole(), 'editor'));
  /** Teams a fork may go to (editor or owner there), the worksheet's own team first. */
  protected readonly forkTeams = computed(() => {
    const a = this.answer();
    if (!a || !this.teams.hasValue()) return [];
    return this.teams
      .value()
      .teams.filter((t) => roleAtLeast(t.role, 'editor'))
      .sort((x, y) => Number(y.id === a.worksheet.teamId) - Number(x.id === a.worksheet.teamId) || x.name.localeCompare(y.name));
  });

  // ---- What-if confidence level -------------------------------------------------------------
  protected readonly presetLevels = PRESET_LEVELS;
  protected readonly offersWhatIf = computed(() => {
    const a = this.answer();
    return a ? hasLevelSteps(a.revision.document) : false;
  });
  protected readonly savedLevels = computed(() => {
    const a = this.answer();
    return a ? statedLevels(a.revision.document) : [];
  });
  protected readonly levelChoice = signal<LevelChoice>('saved');
  protected readonly typedLevel = signal('');
  protected readonly typedLevelError = signal<string | null>(null);
  /** The level the worksheet is being read at; null = as saved. */
  protected readonly whatIfLevel = signal<number | null>(null);
  protected readonly whatIfDocument = computed(() => {
    const a = this.answer();
    const level = this.whatIfLevel();
    return a && level !== null ? documentAtLevel(a.revision.document, level) : null;
  });
  protected readonly whatIf = resource({
    params: () => {
      const a = this.answer();
      const document = this.whatIfDocument();
      return a && document ? { worksheetId: a.worksheet.id, document } : undefined;
    },
    loader: ({ params }): Promise<EvaluationOutcome> => firstValueFrom(this.api.evaluateDraft(params.worksheetId, params.document)),
  });
  protected readonly whatIfError = computed(() => {
    const error = this.whatIf.error();
    return error ? toApiError(error).message : null;
  });
  protected readonly shownDocument = computed(() => this.whatIfDocument() ?? this.answer()?.revision.document ?? null);
  protected readonly shownResults = computed(() => {
    if (this.whatIfLevel() !== null) return this.whatIf.hasValue() ? this.whatIf.value().results : null;
    return this.answer()?.revision.results ?? null;
  });

  // ---- Re-check ----------------------------------------------------------------------------
  protected readonly recheck = signal<RecheckAnswer | null>(null);
  protected readonly rechecking = signal(false);
  protected readonly recheckError = signal<string | null>(null);

  // ---- Fork --------------------------------------------------------------------------------
  protected readonly forking = signal(false);
  protected readonly forkError = signal<string | null>(null);

  protected readonly shortHash = shortHash;
  protected readonly when = formatDateTime;
  protected readonly percent = percentText;
  protected readonly relative = relativeChangeText;

  constructor() {
    // Another revision in the same page (after a fork, or from a link): start afresh.
    effect(() => {
      this.revisionId();
      this.whatIfLevel.set(null);
      this.levelChoice.set('saved');
      this.recheck.set(null);
      this.recheckError.set(null);
      this.forkError.set(null);
    });
  }

  protected chooseLevel(choice: LevelChoice): void {
    this.levelChoice.set(choice);
    this.typedLevelError.set(null);
    if (choice === 'saved') this.whatIfLevel.set(null);
    else if (choice !== 'other') this.whatIfLevel.set(Number(choice));
  }

  protected applyTypedLevel(): void {
    const level = parseLevel(this.typedLevel());
    if (level === null) {
      this.typedLevelError.set('Type a level between 0 and 100 %, for example 99.5');
      return;
    }
    this.typedLevelError.set(null);
    this.whatIfLevel.set(level);
  }

  protected async runRecheck(): Promise<void> {
    if (this.rechecking()) return;
    this.rechecking.set(true);
    this.recheckError.set(null);
    try {
      this.recheck.set(await this.api.recheck(this.revisionId()));
    } catch (error) {
      this.recheckError.set(evaluationErrorText(toApiError(error)));
    } finally {
      this.rechecking.set(false);
    }
  }

  /** Forks this revision (at the what-if level when one is chosen) into `teamId`. */
  protected async fork(teamId: string): Promise<void> {
    const a = this.answer();
    if (!a || this.forking()) return;
    const level = this.whatIfLevel();
    this.forking.set(true);
    this.forkError.set(null);
    try {
      const request =
        level === null
          ? { teamId, message: `Forked from revision ${a.revision.number} of ${a.worksheet.title}` }
          : (() => {
              const title = `${a.revision.document.title} at ${percentText(level)}`.slice(0, 200);
              return {
                teamId,
                title,
                message: `Forked from revision ${a.revision.number} of ${a.worksheet.title}, read at ${percentText(level)} confidence`,
                document: { ...documentAtLevel(a.revision.document, level), title },
              };
            })();
      const fork = await this.api.fork(a.revision.id, request);
      await this.router.navigate(['/revisions', fork.head.id], { state: { forkedFrom: a.revision.id } });
    } catch (error) {
      const apiError = toApiError(error);
      this.forkError.set(
        apiError.status === 403 ? 'You need the editor role in the chosen team to fork into it.' : `Could not fork: ${evaluationErrorText(apiError)}`,
      );
    } finally {
      this.forking.set(false);
    }
  }

  protected openPublish(): void {
    const a = this.answer();
    if (!a) return;
    const data: PublishDialogData = {
      worksheetId: a.worksheet.id,
      worksheetTitle: a.worksheet.title,
      revisionId: a.revision.id,
      revisionNumber: a.revision.number,
    };
    this.dialog
      .open(PublishDialog, { data, width: '600px', maxWidth: 'calc(100vw - 24px)', autoFocus: 'first-tabbable' })
      .afterClosed()
      .subscribe(() => this.revision.reload());
  }

  protected reviewChanged(): void {
    this.revision.reload();
  }

  protected levelValue(level: number): LevelChoice {
    return String(level) as LevelChoice;
  }
}

function evaluationErrorText(error: ApiError): string {
  switch (error.code) {
    case 'evaluation_timeout':
    case 'evaluation_memory':
    case 'evaluation_failed':
      return `The engine could not evaluate this worksheet: ${error.message}`;
    default:
      return error.message;
  }
}
