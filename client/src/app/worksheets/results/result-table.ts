import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import type { ResultTable as ResultTableData } from '@shared/engine/result';

/** A structured result (intervals at several levels, per-group summaries, ANOVA table) as a table. */
@Component({
  selector: 'sp-result-table',
  template: `
    @let data = table();
    <div class="scroller" tabindex="0" role="region" [attr.aria-label]="data.title">
      <table>
        <caption>{{ data.title }}</caption>
        <thead>
          <tr>
            <th scope="col"><span class="sp-visually-hidden">Row</span></th>
            @for (column of data.columns; track column.id) {
              <th scope="col">
                {{ column.label }}
                @if (column.unit) {
                  <span class="unit">({{ column.unit }})</span>
                }
              </th>
            }
          </tr>
        </thead>
        <tbody>
          @for (row of data.rows; track row.id) {
            <tr>
              <th scope="row">{{ row.label }}</th>
              @for (cell of row.cells; track cell.id) {
                <td class="num" [class.missing]="cell.value === null" [attr.title]="cell.reason ?? null">
                  {{ cell.display }}
                </td>
              }
            </tr>
          }
        </tbody>
      </table>
    </div>
  `,
  styles: `
    .scroller { overflow-x: auto; max-width: 100%; border-radius: var(--mat-sys-corner-small); }
    .scroller:focus-visible { outline: 2px solid var(--mat-sys-primary); outline-offset: 2px; }
    table { border-collapse: collapse; min-width: 100%; font: var(--mat-sys-body-medium); }
    caption { text-align: left; font: var(--mat-sys-title-small); padding: 0 0 6px; color: var(--mat-sys-on-surface); }
    th, td { padding: 6px 10px; text-align: right; white-space: nowrap; border-bottom: 1px solid var(--mat-sys-outline-variant); }
    thead th { font: var(--mat-sys-label-medium); color: var(--mat-sys-on-surface-variant); vertical-align: bottom; }
    tbody th { text-align: left; font-weight: 500; white-space: normal; min-width: 8ch; }
    th:first-child { text-align: left; }
    .unit { font-weight: 400; }
    td.missing { color: var(--mat-sys-on-surface-variant); font-family: inherit; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ResultTable {
  readonly table = input.required<ResultTableData>();
}
