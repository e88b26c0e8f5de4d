/**
 * Loads the Monaco editor on first use (a lazy chunk; never in the initial bundle).
 *
 * - Script: the ESM build, bundled by the Angular build; no eval, so it runs under the
 *   Content-Security-Policy's script-src 'self'. Its worker is our own bundled file
 *   (monaco.worker.ts), allowed by worker-src 'self'.
 * - Styles: the build drops the CSS that Monaco's modules import (angular.json `loader`
 *   ".css": "empty"); the editor's stylesheet is copied as an asset instead (monaco/editor.main.css)
 *   and its icon font, inlined there as a data: URL that font-src 'self' would block, is pointed at
 *   the copied font file (monaco/codicon.ttf).
 * - Languages: Markdown (notes) and our derived-column expression language.
 */
import type * as Monaco from 'monaco-editor/esm/vs/editor/editor.api.js';

export type MonacoApi = typeof Monaco;

/** Language id of derived-column expressions (a restricted math.js syntax). */
export const EXPRESSION_LANGUAGE = 'spreadproof-expression';

/**
 * The functions the engine allows in expressions: ALLOWED_FUNCTIONS of shared/engine/derived.ts,
 * repeated here because importing that module would bring math.js into the editor's chunk.
 */
export const EXPRESSION_FUNCTIONS = [
  'abs', 'acos', 'asin', 'atan', 'atan2', 'cbrt', 'ceil', 'col', 'convert', 'cos', 'cosh', 'cube', 'exp', 'expm1',
  'fix', 'floor', 'hypot', 'log', 'log10', 'log1p', 'log2', 'max', 'min', 'mod', 'nthRoot', 'pow', 'round', 'sign',
  'sin', 'sinh', 'sqrt', 'square', 'tan', 'tanh',
];

let loading: Promise<MonacoApi> | null = null;

export function loadMonaco(): Promise<MonacoApi> {
  loading ??= load().catch((error: unknown) => {
    loading = null;
    throw error;
  });
  return loading;
}

async function load(): Promise<MonacoApi> {
  globalThis.MonacoEnvironment = {
    getWorker: () => new Worker(new URL('./monaco.worker', import.meta.url), { type: 'module', name: 'monaco-editor' }),
  };
  const [monaco] = await Promise.all([
    import('monaco-editor/esm/vs/editor/edcore.main.js') as Promise<MonacoApi>,
    import('monaco-editor/esm/vs/basic-languages/markdown/markdown.contribution.js'),
    addEditorStyles(),
  ]);
  registerExpressionLanguage(monaco);
  return monaco;
}

async function addEditorStyles(): Promise<void> {
  if (document.querySelector('style[data-monaco-styles]')) return;
  const response = await fetch('monaco/editor.main.css');
  if (!response.ok) throw new Error(`The editor's stylesheet could not be loaded (${response.status}).`);
  const css = (await response.text()).replace(/url\(\s*["']?data:font\/ttf;base64,[^)"']*["']?\s*\)/g, 'url("monaco/codicon.ttf")');
  const style = document.createElement('style');
  style.dataset['monacoStyles'] = '';
  style.textContent = css;
  document.head.appendChild(style);
}

function registerExpressionLanguage(monaco: MonacoApi): void {
  if (monaco.languages.getLanguages().some((l) => l.id === EXPRESSION_LANGUAGE)) return;
  monaco.languages.register({ id: EXPRESSION_LANGUAGE });
  monaco.languages.setMonarchTokensProvider(EXPRESSION_LANGUAGE, {
    functions: EXPRESSION_FUNCTIONS,
    constants: ['pi', 'e', 'tau'],
    tokenizer: {
      root: [
        [/[a-zA-Z_][\w]*(?=\s*\()/, { cases: { '@functions': 'keyword', '@default': 'invalid' } }],
        [/[a-zA-Z_][\w]*/, { cases: { '@constants': 'constant', '@default': 'variable' } }],
        [/\d*\.\d+([eE][-+]?\d+)?|\d+([eE][-+]?\d+)?/, 'number'],
        [/"[^"]*"/, 'string'],
        [/[+\-*/^%<>=!?:]/, 'operator'],
        [/[()]/, '@brackets'],
        [/,/, 'delimiter'],
        [/\s+/, 'white'],
      ],
    },
  });
  monaco.languages.setLanguageConfiguration(EXPRESSION_LANGUAGE, {
    brackets: [['(', ')']],
    autoClosingPairs: [{ open: '(', close: ')' }],
  });
}

/** Monaco themes from the app's colour tokens, so the editor matches the light and dark themes. */
export function defineThemes(monaco: MonacoApi, host: HTMLElement): { light: string; dark: string } {
  const colour = (token: string, fallback: string) => toHex(resolveColour(host, token, fallback));
  for (const [name, base] of [
    ['spreadproof-light', 'vs'],
    ['spreadproof-dark', 'vs-dark'],
  ] as const) {
    monaco.editor.defineTheme(name, {
      base,
      inherit: true,
      rules: [
        { token: 'keyword', foreground: colour('--mat-sys-primary', '#336').slice(1) },
        { token: 'number', foreground: colour('--mat-sys-tertiary', '#630').slice(1) },
        { token: 'invalid', foreground: colour('--mat-sys-error', '#a00').slice(1) },
      ],
      colors: {
        'editor.background': colour('--mat-sys-surface-container-lowest', base === 'vs' ? '#ffffff' : '#111111'),
        'editor.foreground': colour('--mat-sys-on-surface', base === 'vs' ? '#111111' : '#eeeeee'),
        'editorLineNumber.foreground': colour('--mat-sys-outline', '#888888'),
        'editorCursor.foreground': colour('--mat-sys-primary', '#333366'),
        'editor.selectionBackground': colour('--mat-sys-primary-container', '#ccccee'),
        focusBorder: colour('--mat-sys-primary', '#333366'),
      },
    });
  }
  return { light: 'spreadproof-light', dark: 'spreadproof-dark' };
}

function resolveColour(host: HTMLElement, token: string, fallback: string): string {
  const probe = document.createElement('span');
  probe.style.color = `var(${token}, ${fallback})`;
  probe.style.display = 'none';
  host.appendChild(probe);
  const colour = getComputedStyle(probe).color;
  probe.remove();
  return colour || fallback;
}

function toHex(colour: string): string {
  if (colour.startsWith('#')) return colour.length === 4 ? `#${[...colour.slice(1)].map((c) => c + c).join('')}` : colour.slice(0, 7);
  const parts = colour.match(/[\d.]+/g)?.map(Number) ?? [0, 0, 0];
  return `#${parts
    .slice(0, 3)
    .map((n) => Math.round(n).toString(16).padStart(2, '0'))
    .join('')}`;
}
