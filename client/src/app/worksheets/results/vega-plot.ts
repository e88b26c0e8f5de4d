import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  ElementRef,
  effect,
  inject,
  input,
  signal,
  viewChild,
} from '@angular/core';
import { MatProgressBar } from '@angular/material/progress-bar';
import type { VisualizationSpec } from 'vega-embed';
import { loadVega } from './lazy-libraries';

/**
 * A Vega-Lite plot of a result. vega-embed is loaded on first use and always runs with the
 * expression interpreter (see lazy-libraries.ts), so no plot evaluates code. The plot takes the
 * width of its container and its colours from the theme, and is drawn again when the theme changes.
 */
@Component({
  selector: 'sp-vega-plot',
  imports: [MatProgressBar],
  template: `
    @if (loading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Drawing the plot" />
    }
    @if (failure(); as message) {
      <p class="failure">The plot could not be drawn: {{ message }}</p>
    }
    <div #target class="target" role="img" [attr.aria-label]="label()" data-testid="plot"></div>
  `,
  styles: `
    :host { display: block; width: 100%; min-width: 0; }
    .target { width: 100%; min-height: 40px; }
    .failure { margin: 0; font: var(--mat-sys-body-small); color: var(--mat-sys-error); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VegaPlot {
  readonly spec = input.required<Record<string, unknown>>();
  readonly label = input('Plot of the result');

  protected readonly loading = signal(true);
  protected readonly failure = signal<string | null>(null);
  private readonly target = viewChild.required<ElementRef<HTMLElement>>('target');
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  private readonly scheme = signal(0);
  private finalize: (() => void) | null = null;

  constructor() {
    const media = typeof matchMedia === 'function' ? matchMedia('(prefers-color-scheme: dark)') : null;
    const onScheme = () => this.scheme.update((n) => n + 1);
    media?.addEventListener('change', onScheme);
    inject(DestroyRef).onDestroy(() => {
      media?.removeEventListener('change', onScheme);
      this.finalize?.();
    });

    effect((onCleanup) => {
      const spec = this.spec();
      this.scheme();
      const element = this.target().nativeElement;
      let cancelled = false;
      onCleanup(() => (cancelled = true));
      this.loading.set(true);
      this.failure.set(null);
      loadVega()
        .then((vega) => {
          if (cancelled) return undefined;
          return vega.embed(element, responsive(spec) as VisualizationSpec, {
            actions: false,
            renderer: 'svg',
            config: themeConfig(this.host.nativeElement),
            tooltip: true,
          });
        })
        .then((result) => {
          if (!result) return;
          if (cancelled) {
            result.finalize();
            return;
          }
          this.finalize?.();
          this.finalize = () => result.finalize();
        })
        .catch((error: unknown) => {
          if (!cancelled) this.failure.set(error instanceof Error ? error.message : 'unknown error');
        })
        .finally(() => {
          if (!cancelled) this.loading.set(false);
        });
    });
  }
}

/** Fixed-width specs fill their container instead (a 360 px phone is narrower than most plots). */
function responsive(spec: Record<string, unknown>): Record<string, unknown> {
  const composite = ['hconcat', 'vconcat', 'concat', 'facet', 'repeat'].some((key) => key in spec);
  if (composite || typeof spec['width'] !== 'number') return spec;
  return { ...spec, width: 'container' };
}

/** Resolves a CSS colour token (Material tokens are `light-dark()` expressions) to an rgb() string. */
function tokenColour(host: HTMLElement, token: string, fallback: string): string {
  const probe = document.createElement('span');
  probe.style.color = `var(${token}, ${fallback})`;
  probe.style.display = 'none';
  host.appendChild(probe);
  const colour = getComputedStyle(probe).color || fallback;
  probe.remove();
  return colour;
}

function themeConfig(host: HTMLElement): Record<string, unknown> {
  const text = tokenColour(host, '--mat-sys-on-surface', 'black');
  const muted = tokenColour(host, '--mat-sys-on-surface-variant', 'gray');
  const grid = tokenColour(host, '--mat-sys-outline-variant', 'lightgray');
  const primary = tokenColour(host, '--mat-sys-primary', 'steelblue');
  const tertiary = tokenColour(host, '--mat-sys-tertiary', 'darkorange');
  const secondary = tokenColour(host, '--mat-sys-secondary', 'gray');
  const error = tokenColour(host, '--mat-sys-error', 'firebrick');
  const font = 'Roboto, system-ui, sans-serif';
  return {
    background: null,
    font,
    padding: 4,
    title: { color: text, fontSize: 13, fontWeight: 500, anchor: 'start', offset: 8 },
    axis: {
      domainColor: muted,
      tickColor: muted,
      gridColor: grid,
      labelColor: muted,
      titleColor: text,
      labelFont: 'JetBrains Mono, ui-monospace, monospace',
      labelFontSize: 10,
      titleFontSize: 11,
      titleFontWeight: 500,
    },
    legend: { labelColor: text, titleColor: text, labelFontSize: 11, titleFontSize: 11 },
    view: { stroke: null },
    range: { category: [primary, tertiary, secondary, error, muted] },
    mark: { color: primary },
    bar: { fill: primary },
    line: { stroke: tertiary },
    rule: { stroke: text },
    point: { fill: primary, stroke: primary },
    area: { fill: error },
  };
}
