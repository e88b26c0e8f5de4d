import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { MatPaginator, PageEvent } from '@angular/material/paginator';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import type { InlineColumn } from '@shared/format/worksheet';
import { Subscription } from 'rxjs';
import { toApiError } from '../../core/api-error';
import { WorksheetApi } from '../worksheet-api';

type Cell = number | string | null;

/**
 * A page of a data step's table: the typed-in columns, or the rows of an uploaded dataset read
 * page by page from the service. Blank cells and cells that are not numbers are marked.
 */
@Component({
  selector: 'sp-table-preview',
  imports: [MatTableModule, MatPaginator, MatProgressBar],
  template: `
    @if (loading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Loading rows" />
    }
    @if (error(); as message) {
      <p class="sp-alert error" role="alert">{{ message }}</p>
    }
    <div class="scroller" tabindex="0" role="region" [attr.aria-label]="label()">
      <table mat-table [dataSource]="rows()" class="preview" data-testid="table-preview">
        <ng-container matColumnDef="#">
          <th mat-header-cell *matHeaderCellDef scope="col"><span class="sp-visually-hidden">Row</span>#</th>
          <td mat-cell *matCellDef="let row; let i = index" class="row-number">{{ offset() + i + 1 }}</td>
        </ng-container>
        @for (name of columnNames(); track name; let j = $index) {
          <ng-container [matColumnDef]="'c' + j">
            <th mat-header-cell *matHeaderCellDef scope="col">
              {{ name }}
              @if (types()[j]; as type) {
                <span class="type">{{ type }}</span>
              }
            </th>
            <td mat-cell *matCellDef="let row" [class.blank]="row[j] === null" [class.odd]="isOdd(row[j], j)" [class.num]="typeof row[j] === 'number'">
              {{ row[j] === null ? '' : row[j] }}
            </td>
          </ng-container>
        }
        <tr mat-header-row *matHeaderRowDef="displayed(); sticky: true"></tr>
        <tr mat-row *matRowDef="let row; columns: displayed()"></tr>
      </table>
    </div>
    <mat-paginator
      [length]="total()"
      [pageSize]="pageSize()"
      [pageIndex]="pageIndex()"
      [pageSizeOptions]="[10, 25, 50, 100]"
      (page)="paged($event)"
      [attr.aria-label]="'Pages of ' + label()"
    />
  `,
  styles: `
    :host { display: block; min-width: 0; }
    .scroller { overflow: auto; max-height: 420px; border: 1px solid var(--mat-sys-outline-variant); border-radius: var(--mat-sys-corner-small); }
    .scroller:focus-visible { outline: 2px solid var(--mat-sys-primary); outline-offset: 2px; }
    .preview { width: 100%; --mat-table-row-item-container-height: 32px; --mat-table-header-container-height: 40px; }
    th.mat-mdc-header-cell { white-space: nowrap; font: var(--mat-sys-label-large); }
    td.mat-mdc-cell { white-space: nowrap; font-family: var(--sp-font-mono); font-size: 13px; padding: 0 12px; }
    .row-number { color: var(--mat-sys-on-surface-variant); }
    .type { margin-left: 4px; font: var(--mat-sys-label-small); color: var(--mat-sys-on-surface-variant); }
    td.blank { background: var(--mat-sys-surface-container-high); }
    td.odd { color: var(--mat-sys-error); font-style: italic; }
    td.num { text-align: right; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TablePreview {
  /** Typed-in columns (shown from memory)… */
  readonly columns = input<readonly InlineColumn[] | null>(null);
  /** …or an uploaded dataset of a team, read a page at a time. */
  readonly dataset = input<{ teamId: string; datasetId: string; rowCount: number; columns: { name: string; type: string }[] } | null>(null);
  readonly label = input('Table preview');

  private readonly api = inject(WorksheetApi);
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(10);
  protected readonly loading = signal(false);
  protected readonly error = signal<string | null>(null);
  private readonly remoteRows = signal<Cell[][]>([]);
  private subscription: Subscription | null = null;

  protected readonly columnNames = computed(() => this.columns()?.map((c) => c.name) ?? this.dataset()?.columns.map((c) => c.name) ?? []);
  protected readonly types = computed(() => this.columns()?.map((c) => c.type) ?? this.dataset()?.columns.map((c) => c.type) ?? []);
  protected readonly displayed = computed(() => ['#', ...this.columnNames().map((_, j) => `c${j}`)]);
  protected readonly total = computed(() => {
    const columns = this.columns();
    if (columns) return Math.max(0, ...columns.map((c) => c.values.length));
    return this.dataset()?.rowCount ?? 0;
  });
  protected readonly offset = computed(() => this.pageIndex() * this.pageSize());
  protected readonly rows = computed<Cell[][]>(() => {
    const columns = this.columns();
    if (!columns) return this.remoteRows();
    const from = this.offset();
    const to = Math.min(this.total(), from + this.pageSize());
    const rows: Cell[][] = [];
    for (let i = from; i < to; i++) rows.push(columns.map((c) => (c.values[i] ?? null) as Cell));
    return rows;
  });

  constructor() {
    // Back to the first page when the table is replaced by a shorter one.
    effect(() => {
      const total = this.total();
      untracked(() => {
        if (this.offset() >= total && this.pageIndex() > 0) this.pageIndex.set(0);
      });
    });
    effect(() => {
      const dataset = this.dataset();
      const offset = this.offset();
      const limit = this.pageSize();
      if (!dataset || this.columns()) return;
      untracked(() => this.fetch(dataset.teamId, dataset.datasetId, offset, limit));
    });
  }

  protected isOdd(value: Cell, column: number): boolean {
    return this.types()[column] === 'number' && typeof value === 'string';
  }

  protected paged(event: PageEvent): void {
    this.pageSize.set(event.pageSize);
    this.pageIndex.set(event.pageIndex);
  }

  private fetch(teamId: string, datasetId: string, offset: number, limit: number): void {
    this.subscription?.unsubscribe();
    this.loading.set(true);
    this.error.set(null);
    this.subscription = this.api.datasetRows(teamId, datasetId, offset, limit).subscribe({
      next: (answer) => {
        this.remoteRows.set(answer.rows.values);
        this.loading.set(false);
      },
      error: (error: unknown) => {
        this.error.set(toApiError(error).message);
        this.loading.set(false);
      },
    });
  }
}
