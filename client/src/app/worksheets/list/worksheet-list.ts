import { httpResource } from '@angular/common/http';
import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormField, MatLabel, MatPrefix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatPaginator, PageEvent } from '@angular/material/paginator';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatSort, MatSortHeader, Sort } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { Router, RouterLink } from '@angular/router';
import { map } from 'rxjs';
import { toApiError } from '../../core/api-error';
import { roleAtLeast } from '../../core/roles';
import type { TeamSummary } from '../../teams/teams';
import { Page, WorksheetApi, WorksheetListQuery, WorksheetSummary, WorksheetWithHead } from '../worksheet-api';
import { NewWorksheetData, NewWorksheetDialog } from './new-worksheet-dialog';

const SORTABLE: Record<string, WorksheetListQuery['sort']> = { title: 'title', revision: 'updated', created: 'created' };

/**
 * The worksheets of the user's teams: search, team filter, sort, pages; new worksheet (blank or
 * from an example) and import. Sorting and paging happen on the server.
 */
@Component({
  selector: 'sp-worksheet-list',
  imports: [
    MatTableModule,
    MatSort,
    MatSortHeader,
    MatPaginator,
    MatFormField,
    MatLabel,
    MatPrefix,
    MatInput,
    MatSelect,
    MatOption,
    MatButton,
    MatIcon,
    MatProgressBar,
    RouterLink,
  ],
  templateUrl: './worksheet-list.html',
  styleUrl: './worksheet-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class WorksheetList {
  readonly teams = input.required<readonly TeamSummary[]>();

  private readonly dialog = inject(MatDialog);
  private readonly router = inject(Router);
  private readonly narrow = toSignal(
    inject(BreakpointObserver)
      .observe('(max-width: 719px)')
      .pipe(map((state) => state.matches)),
    { initialValue: false },
  );

  protected readonly search = signal('');
  protected readonly teamId = signal('');
  protected readonly sort = signal<{ active: string; direction: 'asc' | 'desc' }>({ active: 'revision', direction: 'desc' });
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(10);
  private searchTimer: ReturnType<typeof setTimeout> | undefined;

  protected readonly query = computed<WorksheetListQuery>(() => ({
    q: this.search().trim() || undefined,
    teamId: this.teamId() || undefined,
    sort: SORTABLE[this.sort().active] ?? 'updated',
    order: this.sort().direction,
    page: this.pageIndex() + 1,
    pageSize: this.pageSize(),
  }));
  protected readonly list = httpResource<Page<WorksheetSummary>>(() => WorksheetApi.listUrl(this.query()));
  protected readonly rows = computed(() => (this.list.hasValue() ? this.list.value().items : []));
  protected readonly total = computed(() => (this.list.hasValue() ? this.list.value().total : 0));
  protected readonly loadError = computed(() => {
    const error = this.list.error();
    return error ? toApiError(error).message : null;
  });
  protected readonly editableTeams = computed(() => this.teams().filter((t) => roleAtLeast(t.role, 'editor')));
  protected readonly columns = computed(() =>
    this.narrow() ? ['title', 'revision', 'review'] : ['title', 'team', 'revision', 'author', 'review', 'published'],
  );

  protected searchInput(text: string): void {
    clearTimeout(this.searchTimer);
    this.searchTimer = setTimeout(() => {
      this.search.set(text);
      this.pageIndex.set(0);
    }, 250);
  }

  protected chooseTeam(teamId: string): void {
    this.teamId.set(teamId);
    this.pageIndex.set(0);
  }

  protected sorted(sort: Sort): void {
    const direction = sort.direction || (sort.active === 'title' ? 'asc' : 'desc');
    this.sort.set({ active: sort.active, direction });
    this.pageIndex.set(0);
  }

  protected paged(event: PageEvent): void {
    this.pageSize.set(event.pageSize);
    this.pageIndex.set(event.pageIndex);
  }

  protected reviewText(worksheet: WorksheetSummary): string {
    if (!worksheet.review) return 'Not reviewed';
    return worksheet.review.verdict === 'approved' ? 'Approved' : 'Changes requested';
  }

  protected when(iso: string): string {
    const date = new Date(iso);
    return Number.isNaN(date.getTime()) ? iso : date.toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' });
  }

  protected async create(mode: NewWorksheetData['mode']): Promise<void> {
    const ref = this.dialog.open<NewWorksheetDialog, NewWorksheetData, WorksheetWithHead>(NewWorksheetDialog, {
      data: { teams: [...this.editableTeams()], mode },
      maxWidth: '95vw',
    });
    ref.afterClosed().subscribe((created) => {
      if (created) void this.router.navigate(['/worksheets', created.worksheet.id]);
    });
  }
}
