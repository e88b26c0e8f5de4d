/**
 * The large libraries of the result views, loaded on first use so that they stay out of the
 * initial bundle: KaTeX (formulas) with its stylesheet, and vega-embed (plots) with the expression
 * interpreter, so that no plot needs `eval` (the Content-Security-Policy has no 'unsafe-eval').
 */
import type { EmbedOptions, Result as EmbedResult, VisualizationSpec } from 'vega-embed';

export type Katex = typeof import('katex').default;

export interface VegaRenderer {
  embed(element: HTMLElement, spec: VisualizationSpec, options: EmbedOptions): Promise<EmbedResult>;
}

let katexPromise: Promise<Katex> | null = null;
let vegaPromise: Promise<VegaRenderer> | null = null;
const stylesheets = new Map<string, Promise<void>>();

/** Remembers a load while it works; forgets it when it fails, so the next use tries again. */
function once<T>(get: () => Promise<T> | null, set: (p: Promise<T> | null) => void, load: () => Promise<T>): Promise<T> {
  let pending = get();
  if (!pending) {
    pending = load().catch((error: unknown) => {
      set(null);
      throw error;
    });
    set(pending);
  }
  return pending;
}

/**
 * Adds a stylesheet of the build once (angular.json lists it with `inject: false`, so it is emitted
 * under its bundle name and not linked from index.html).
 */
export function loadStylesheet(href: string): Promise<void> {
  return once(
    () => stylesheets.get(href) ?? null,
    (p) => (p ? stylesheets.set(href, p) : stylesheets.delete(href)),
    () =>
      new Promise<void>((resolve, reject) => {
        const link = document.createElement('link');
        link.rel = 'stylesheet';
        link.href = href;
        link.onload = () => resolve();
        link.onerror = () => {
          link.remove();
          reject(new Error(`Could not load the stylesheet ${href}.`));
        };
        document.head.appendChild(link);
      }),
  );
}

/** KaTeX, with its stylesheet and fonts (the `katex` style bundle). */
export function loadKatex(): Promise<Katex> {
  return once(
    () => katexPromise,
    (p) => (katexPromise = p),
    async () => {
      const [module] = await Promise.all([import('katex'), loadStylesheet('katex.css')]);
      return module.default;
    },
  );
}

/** vega-embed, always with the CSP-safe expression interpreter (`ast: true`). */
export function loadVega(): Promise<VegaRenderer> {
  return once(
    () => vegaPromise,
    (p) => (vegaPromise = p),
    async () => {
      const [embedModule, interpreter] = await Promise.all([import('vega-embed'), import('vega-interpreter')]);
      return {
        embed: (element, spec, options) =>
          embedModule.default(element, spec, { ...options, ast: true, expr: interpreter.expressionInterpreter }),
      };
    },
  );
}
