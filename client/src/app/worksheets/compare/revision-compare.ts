import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, resource, signal } from '@angular/core';
import { MatIconButton } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatOptgroup, MatOption } from '@angular/material/core';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSelect } from '@angular/material/select';
import { MatTooltip } from '@angular/material/tooltip';
import { Router, RouterLink } from '@angular/router';
import { toApiError } from '../../core/api-error';
import { TeamSummary, Teams } from '../../teams/teams';
import { ReviewPanel } from '../review/review-panel';
import { VerdictBadges } from '../review/verdict-badges';
import { CompareAnswer, RevisionAnswer, RevisionSummary, WorksheetApi } from '../worksheet-api';
import { formatDateTime, relativeChangeText, shortHash } from '../history/revision-labels';
import { stepKindInfo } from '../results/step-kinds';
import { conclusionText, groupResultsByStep, isNotable, leafText, paramPathText, resultValueText } from './compare-values';

interface PickerGroup {
  worksheetId: string;
  title: string;
  relation: 'this' | 'origin' | 'fork' | 'other';
  revisions: RevisionSummary[];
}

const CHANGE_LABEL: Readonly<Record<string, string>> = {
  added: 'Added',
  removed: 'Removed',
  moved: 'Moved',
  changed: 'Changed',
  moved_and_changed: 'Moved and changed',
};

/**
 * Two revisions side by side — of one worksheet, or a fork and its origin: conclusions that flipped
 * first, then result changes old → new, changed steps parameter by parameter, and changed data.
 * A reviewer can record a verdict on either revision from here.
 */
@Component({
  selector: 'sp-revision-compare',
  imports: [
    RouterLink,
    MatIconButton,
    MatButtonToggleGroup,
    MatButtonToggle,
    MatFormField,
    MatLabel,
    MatSelect,
    MatOption,
    MatOptgroup,
    MatIcon,
    MatProgressBar,
    MatTooltip,
    ReviewPanel,
    VerdictBadges,
  ],
  templateUrl: './revision-compare.html',
  styleUrl: './revision-compare.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RevisionCompare {
  private readonly router = inject(Router);
  private readonly api = inject(WorksheetApi);

  /** Query parameters `?from=<revisionId>&to=<revisionId>`. */
  readonly from = input<string | undefined>();
  readonly to = input<string | undefined>();

  protected readonly sameRevision = computed(() => !!this.from() && this.from() === this.to());

  protected readonly fromRevision = httpResource<RevisionAnswer>(() => {
    const id = this.from();
    return id ? WorksheetApi.revisionUrl(id) : undefined;
  });
  protected readonly toRevision = httpResource<RevisionAnswer>(() => {
    const id = this.to();
    return id ? WorksheetApi.revisionUrl(id) : undefined;
  });
  protected readonly comparison = httpResource<CompareAnswer>(() => {
    const from = this.from();
    const to = this.to();
    return from && to && from !== to ? WorksheetApi.compareUrl(from, to) : undefined;
  });
  private readonly teams = httpResource<{ teams: TeamSummary[] }>(() => Teams.listUrl);

  protected readonly fromAnswer = computed(() => (this.fromRevision.hasValue() ? this.fromRevision.value() : null));
  protected readonly toAnswer = computed(() => (this.toRevision.hasValue() ? this.toRevision.value() : null));
  protected readonly answer = computed(() => (this.comparison.hasValue() ? this.comparison.value() : null));
  protected readonly result = computed(() => this.answer()?.comparison ?? null);

  protected readonly loadError = computed(() => {
    const error = this.comparison.error() ?? this.toRevision.error() ?? this.fromRevision.error();
    return error ? toApiError(error) : null;
  });

  /** The worksheets whose revisions the pickers offer: this one, its origin, its forks. */
  private readonly pickerSources = computed(() => {
    const sources: { worksheetId: string; title: string; relation: PickerGroup['relation'] }[] = [];
    const add = (worksheetId: string, title: string, relation: PickerGroup['relation']) => {
      if (!sources.some((s) => s.worksheetId === worksheetId)) sources.push({ worksheetId, title, relation });
    };
    const to = this.toAnswer() ?? this.fromAnswer();
    if (!to) return sources;
    add(to.worksheet.id, to.worksheet.title, 'this');
    const origin = to.worksheet.origin;
    if (origin && origin.worksheetTitle !== null) add(origin.worksheetId, origin.worksheetTitle, 'origin');
    const from = this.fromAnswer();
    if (from) add(from.worksheet.id, from.worksheet.title, 'other');
    return sources;
  });

  protected readonly pickerGroups = resource({
    params: () => this.pickerSources(),
    loader: async ({ params }): Promise<PickerGroup[]> => {
      const timelines = await Promise.all(params.map((s) => this.api.timeline(s.worksheetId).catch(() => null)));
      const groups: PickerGroup[] = params.map((s, i) => ({ ...s, revisions: timelines[i]?.items ?? [] }));
      // Forks of the compared worksheet join the list too (their titles come with the timeline).
      const forks = timelines[0]?.forks ?? [];
      const missing = forks.filter((f) => !groups.some((g) => g.worksheetId === f.worksheetId));
      const forkTimelines = await Promise.all(missing.map((f) => this.api.timeline(f.worksheetId).catch(() => null)));
      missing.forEach((f, i) => groups.push({ worksheetId: f.worksheetId, title: f.title, relation: 'fork', revisions: forkTimelines[i]?.items ?? [] }));
      return groups.filter((g) => g.revisions.length > 0);
    },
  });
  protected readonly groups = computed(() => (this.pickerGroups.hasValue() ? this.pickerGroups.value() : []));

  /** The reader's role in each team, for the review panels. */
  protected readonly roleIn = computed(() => {
    const map = new Map<string, string>();
    if (this.teams.hasValue()) for (const t of this.teams.value().teams) map.set(t.id, t.role);
    return map;
  });

  protected readonly resultGroups = computed(() => groupResultsByStep(this.result()?.results ?? []));
  protected readonly flipped = computed(() => (this.result()?.conclusions ?? []).filter((c) => c.flipped));
  protected readonly otherConclusions = computed(() => (this.result()?.conclusions ?? []).filter((c) => !c.flipped));
  /** Step kinds by id, from the newer document (older for removed steps), for group headings. */
  protected readonly kindOf = computed(() => {
    const map = new Map<string, string>();
    for (const s of this.fromAnswer()?.revision.document.steps ?? []) map.set(s.id, s.kind);
    for (const s of this.toAnswer()?.revision.document.steps ?? []) map.set(s.id, s.kind);
    return map;
  });
  protected readonly crossWorksheet = computed(() => {
    const a = this.fromAnswer();
    const b = this.toAnswer();
    return !!a && !!b && a.worksheet.id !== b.worksheet.id;
  });

  /** Which of the two revisions the verdict form is about. */
  protected readonly reviewSide = signal<'from' | 'to'>('to');
  protected readonly reviewTarget = computed(() => (this.reviewSide() === 'to' ? this.toAnswer() : this.fromAnswer()));

  protected readonly shortHash = shortHash;
  protected readonly when = formatDateTime;
  protected readonly kindLabel = (kind: string) => stepKindInfo(kind).label;
  protected readonly changeLabel = CHANGE_LABEL;
  protected readonly leaf = leafText;
  protected readonly paramPath = paramPathText;
  protected readonly valueText = resultValueText;
  protected readonly relative = relativeChangeText;
  protected readonly truth = conclusionText;
  protected readonly notable = isNotable;

  protected pick(side: 'from' | 'to', revisionId: string): void {
    const from = side === 'from' ? revisionId : this.from();
    const to = side === 'to' ? revisionId : this.to();
    void this.router.navigate([], { queryParams: { from, to }, replaceUrl: false });
  }

  protected swap(): void {
    void this.router.navigate([], { queryParams: { from: this.to(), to: this.from() } });
  }

  protected reviewChanged(): void {
    this.comparison.reload();
    this.fromRevision.reload();
    this.toRevision.reload();
  }

  protected relationText(group: PickerGroup): string {
    switch (group.relation) {
      case 'origin':
        return `${group.title} (origin)`;
      case 'fork':
        return `${group.title} (fork)`;
      default:
        return group.title;
    }
  }
}
