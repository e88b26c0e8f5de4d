import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, output, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { AbstractControl, NonNullableFormBuilder, ReactiveFormsModule, ValidationErrors, Validators } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatOption } from '@angular/material/core';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatRadioButton, MatRadioGroup } from '@angular/material/radio';
import { MatSelect } from '@angular/material/select';
import { ApiError, toApiError } from '../../core/api-error';
import { validationMessage } from '../../core/field-messages';
import { roleAtLeast, roleLabel } from '../../core/roles';
import { showServerErrors } from '../../core/server-errors';
import { Session } from '../../core/session';
import { TeamDetail, Teams } from '../../teams/teams';
import { VERDICT_LABEL, formatAge, formatDateTime, latestVerdicts, shortHash } from '../history/revision-labels';
import { ReviewVerdictKind, RevisionReviewsAnswer, RevisionSummary, WorksheetApi } from '../worksheet-api';

/** A comment is required when asking for changes (the server's rule too). */
function commentNeededForChanges(control: AbstractControl<string>): ValidationErrors | null {
  const verdict = control.parent?.get('verdict')?.value as ReviewVerdictKind | '' | undefined;
  return verdict === 'changes_requested' && control.value.trim() === '' ? { changesNeedComment: true } : null;
}

/**
 * The review of one revision: the verdicts given (each names the content hash it is about), open
 * requests, asking a team member for a review (editors), and giving a verdict (reviewers other than
 * the revision's author).
 */
@Component({
  selector: 'sp-review-panel',
  imports: [
    ReactiveFormsModule,
    MatButton,
    MatFormField,
    MatLabel,
    MatError,
    MatHint,
    MatInput,
    MatSelect,
    MatOption,
    MatRadioGroup,
    MatRadioButton,
    MatIcon,
    MatProgressBar,
  ],
  templateUrl: './review-panel.html',
  styleUrl: './review-panel.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ReviewPanel {
  private readonly api = inject(WorksheetApi);
  private readonly session = inject(Session);
  private readonly fb = inject(NonNullableFormBuilder);

  readonly revision = input.required<RevisionSummary>();
  readonly teamId = input.required<string>();
  /** The reader's role in the worksheet's team. */
  readonly myRole = input.required<string | null>();
  /** Emitted after a verdict or a request was stored, so the page can refresh its badges. */
  readonly changed = output<void>();

  /** The id alone, so that a reloaded summary of the same revision does not reset the forms. */
  private readonly revisionId = computed(() => this.revision().id);
  protected readonly reviews = httpResource<RevisionReviewsAnswer>(() => WorksheetApi.reviewsUrl(this.revisionId()));
  protected readonly verdicts = computed(() => {
    if (!this.reviews.hasValue()) return [];
    return [...this.reviews.value().reviews].sort((a, b) => (a.createdAt < b.createdAt ? 1 : -1));
  });
  protected readonly latestIds = computed(() => new Set(latestVerdicts(this.verdicts()).map((v) => v.id)));
  protected readonly openRequests = computed(() =>
    this.reviews.hasValue() ? this.reviews.value().requests.filter((r) => r.status === 'open') : [],
  );
  protected readonly loadError = computed(() => {
    const error = this.reviews.error();
    return error ? toApiError(error).message : null;
  });

  protected readonly myId = computed(() => this.session.user()?.id ?? null);
  protected readonly isAuthor = computed(() => this.revision().author.id === this.myId());
  /** My verdict that counts on this revision, if I gave one. */
  protected readonly myVerdict = computed(() => latestVerdicts(this.verdicts()).find((v) => v.reviewer.id === this.myId()) ?? null);
  /** After a verdict the form folds away; a new verdict (which supersedes) is one click. */
  protected readonly verdictFormOpen = signal(false);
  protected readonly showVerdictForm = computed(() => this.myVerdict() === null || this.verdictFormOpen());
  protected readonly hasReviewRole = computed(() => roleAtLeast(this.myRole(), 'reviewer'));
  protected readonly canReview = computed(() => this.hasReviewRole() && !this.isAuthor());
  protected readonly canRequest = computed(() => roleAtLeast(this.myRole(), 'editor'));

  /** Team members who may review this revision: reviewer role or higher, not its author. */
  protected readonly team = httpResource<TeamDetail>(() => (this.canRequest() ? Teams.detailUrl(this.teamId()) : undefined));
  protected readonly candidates = computed(() => {
    if (!this.team.hasValue()) return [];
    const author = this.revision().author.id;
    return this.team
      .value()
      .members.filter((m) => m.userId !== author && roleAtLeast(m.role, 'reviewer'))
      .sort((a, b) => a.name.localeCompare(b.name));
  });

  protected readonly verdictForm = this.fb.group({
    verdict: this.fb.control<ReviewVerdictKind | ''>('', { validators: [Validators.required] }),
    comment: this.fb.control('', { validators: [commentNeededForChanges, Validators.maxLength(5000)] }),
  });
  protected readonly sendingVerdict = signal(false);
  protected readonly verdictError = signal<string | null>(null);
  protected readonly verdictNotice = signal<string | null>(null);

  protected readonly requestOpen = signal(false);
  protected readonly requestForm = this.fb.group({
    reviewerId: ['', [Validators.required]],
    message: ['', [Validators.maxLength(2000)]],
  });
  protected readonly sendingRequest = signal(false);
  protected readonly requestError = signal<string | null>(null);
  protected readonly requestNotice = signal<string | null>(null);

  protected readonly label = VERDICT_LABEL;
  protected readonly message = validationMessage;
  protected readonly roleLabel = roleLabel;
  protected readonly shortHash = shortHash;
  protected readonly age = formatAge;
  protected readonly when = formatDateTime;

  constructor() {
    // The comment rule depends on the verdict chosen.
    this.verdictForm.controls.verdict.valueChanges
      .pipe(takeUntilDestroyed(inject(DestroyRef)))
      .subscribe(() => this.verdictForm.controls.comment.updateValueAndValidity());
    // Another revision shown in the same page: start the forms afresh.
    effect(() => {
      this.revisionId();
      this.verdictForm.reset({ verdict: '', comment: '' });
      this.verdictFormOpen.set(false);
      this.verdictNotice.set(null);
      this.verdictError.set(null);
      this.requestNotice.set(null);
      this.verdictFormOpen.set(false);
    });
  }

  protected commentMessage(): string | null {
    const errors = this.verdictForm.controls.comment.errors;
    if (errors?.['changesNeedComment']) return 'Say which changes you are asking for.';
    return this.message(errors, 'Comment');
  }

  protected async sendVerdict(): Promise<void> {
    if (this.sendingVerdict()) return;
    this.verdictForm.markAllAsTouched();
    this.verdictForm.controls.comment.updateValueAndValidity();
    if (this.verdictForm.invalid) return;
    const { verdict, comment } = this.verdictForm.getRawValue();
    if (verdict === '') return;
    this.sendingVerdict.set(true);
    this.verdictError.set(null);
    this.verdictNotice.set(null);
    const revision = this.revision();
    try {
      await this.api.giveVerdict(revision.id, verdict, comment.trim(), revision.contentHash);
      this.verdictForm.reset({ verdict: '', comment: '' });
      this.verdictFormOpen.set(false);
      this.verdictNotice.set(
        verdict === 'approved'
          ? `You approved revision ${revision.number} (content ${shortHash(revision.contentHash)}).`
          : `You requested changes to revision ${revision.number}.`,
      );
      this.reviews.reload();
      this.changed.emit();
    } catch (error) {
      this.verdictError.set(this.verdictErrorText(toApiError(error)));
    } finally {
      this.sendingVerdict.set(false);
    }
  }

  private verdictErrorText(error: ApiError): string | null {
    switch (error.code) {
      case 'hash_mismatch':
        return 'The content of this revision is not the one you looked at. Reload the page and review it again.';
      case 'self_review':
        return 'You saved this revision, so someone else must review it.';
      case 'forbidden':
        return 'Only reviewers, editors and owners of the team can give a verdict.';
      default:
        return showServerErrors(this.verdictForm, error);
    }
  }

  protected async sendRequest(): Promise<void> {
    if (this.sendingRequest()) return;
    this.requestForm.markAllAsTouched();
    if (this.requestForm.invalid) return;
    const { reviewerId, message } = this.requestForm.getRawValue();
    this.sendingRequest.set(true);
    this.requestError.set(null);
    this.requestNotice.set(null);
    try {
      const request = await this.api.requestReview(this.revision().id, reviewerId, message.trim());
      this.requestForm.reset({ reviewerId: '', message: '' });
      this.requestOpen.set(false);
      this.requestNotice.set(`${request.reviewer.name} is asked to review revision ${request.revisionNumber}.`);
      this.reviews.reload();
      this.changed.emit();
    } catch (error) {
      const apiError = toApiError(error);
      this.requestError.set(
        apiError.code === 'bad_reviewer'
          ? 'That person cannot review this revision: they need the reviewer role or higher, and must not be its author.'
          : showServerErrors(this.requestForm, apiError),
      );
    } finally {
      this.sendingRequest.set(false);
    }
  }
}
