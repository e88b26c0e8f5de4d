import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { RouterLink } from '@angular/router';

@Component({
  selector: 'sp-not-found',
  imports: [MatButton, RouterLink],
  template: `
    <div class="sp-page">
      <section class="sp-panel">
        <h1 class="sp-page-title">Page not found</h1>
        <p class="sp-muted">There is nothing at this address. It may have moved, or the link may be incomplete.</p>
        <a matButton="tonal" routerLink="/">Go to your teams</a>
      </section>
    </div>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotFound {}
