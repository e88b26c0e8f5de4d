import { ChangeDetectionStrategy, Component, ElementRef, effect, inject, input, signal, viewChild } from '@angular/core';
import { loadKatex } from './lazy-libraries';

/**
 * A TeX formula typeset with KaTeX (loaded on first use). KaTeX writes into the element itself, so
 * nothing goes through innerHTML; `trust` stays off, so the TeX cannot add links or classes.
 * Until KaTeX has loaded, and if a formula cannot be typeset, the TeX source is shown instead.
 */
@Component({
  selector: 'sp-tex',
  template: `
    <span #target class="tex" [class.display]="display()" [attr.data-testid]="'tex'"></span>
    @if (!rendered()) {
      <code class="source">{{ tex() }}</code>
    }
  `,
  styles: `
    :host { display: inline; }
    :host(.block) { display: block; }
    .display { display: block; overflow-x: auto; overflow-y: hidden; padding: 2px 0; }
    .source { font-size: 0.9em; color: var(--mat-sys-on-surface-variant); }
  `,
  host: { '[class.block]': 'display()' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TexFormula {
  readonly tex = input.required<string>();
  readonly display = input(false);

  protected readonly rendered = signal(false);
  private readonly target = viewChild.required<ElementRef<HTMLElement>>('target');

  constructor() {
    effect((onCleanup) => {
      const tex = this.tex();
      const displayMode = this.display();
      const element = this.target().nativeElement;
      let cancelled = false;
      onCleanup(() => (cancelled = true));
      loadKatex()
        .then((katex) => {
          if (cancelled) return;
          try {
            katex.render(tex, element, { displayMode, throwOnError: true, trust: false, output: 'htmlAndMathml', strict: 'ignore' });
            this.rendered.set(true);
          } catch {
            element.textContent = '';
            this.rendered.set(false);
          }
        })
        .catch(() => this.rendered.set(false));
    });
  }
}
