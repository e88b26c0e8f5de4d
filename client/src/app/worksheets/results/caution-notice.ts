import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIcon } from '@angular/material/icon';

/**
 * The standing caution of every worksheet view: what the results assume, and that they support,
 * and do not replace, qualified judgement, the quality system and the applicable standards.
 */
@Component({
  selector: 'sp-caution-notice',
  imports: [MatIcon],
  template: `
    <aside class="notice" [class.compact]="compact()" aria-label="Before you rely on these results" data-testid="caution">
      <mat-icon aria-hidden="true">gavel</mat-icon>
      <div>
        <p class="lead">These results support, and do not replace, qualified judgement, your quality system, customer requirements and the applicable standards (for example ISO 16269, ISO 22514).</p>
        @if (!compact()) {
          <p>
            They assume independent observations. The chi-square and F methods also assume normally distributed
            measurements and are badly affected by heavy tails; check normality, and prefer the robust methods
            (Bonett, Levene, Brown-Forsythe) when it is in doubt.
          </p>
        }
      </div>
    </aside>
  `,
  styles: `
    .notice {
      display: flex; gap: 12px; align-items: flex-start;
      padding: 12px 16px; border-radius: var(--mat-sys-corner-medium);
      background: var(--sp-accent-container); color: var(--sp-on-accent-container);
      font: var(--mat-sys-body-medium);
    }
    .notice .mat-icon { flex: none; }
    p { margin: 0; max-width: 90ch; }
    p + p { margin-top: 4px; }
    .lead { font-weight: 500; }
    .compact { padding: 8px 12px; font: var(--mat-sys-body-small); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CautionNotice {
  readonly compact = input(false);
}
