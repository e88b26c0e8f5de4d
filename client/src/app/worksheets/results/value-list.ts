import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import type { ResultValue } from '@shared/engine/result';
import { TexFormula } from './tex-formula';

/**
 * The headline quantities of a result: label, symbol, the number in JetBrains Mono and its unit.
 * A value that could not be computed shows "not available" with the reason, never a number.
 */
@Component({
  selector: 'sp-value-list',
  imports: [TexFormula],
  template: `
    <dl class="values" [attr.aria-label]="label()">
      @for (value of values(); track value.id) {
        <div class="value" [class.missing]="value.value === null" [attr.data-value-id]="value.id">
          <dt>
            <span class="label">{{ value.label }}</span>
            @if (value.symbol) {
              <span class="symbol"><sp-tex [tex]="value.symbol" /></span>
            }
          </dt>
          <dd>
            <span class="num">{{ value.display }}</span>
            @if (value.unit && value.value !== null) {
              <span class="unit">{{ value.unit }}</span>
            }
            @if (value.reason && value.value === null) {
              <span class="reason">{{ value.reason }}</span>
            }
          </dd>
        </div>
      }
    </dl>
  `,
  styleUrl: './value-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ValueList {
  readonly values = input.required<readonly ResultValue[]>();
  readonly label = input('Values');
}
