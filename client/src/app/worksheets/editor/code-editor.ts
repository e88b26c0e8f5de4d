import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  ElementRef,
  afterNextRender,
  effect,
  inject,
  input,
  output,
  signal,
  viewChild,
} from '@angular/core';
import { MatProgressBar } from '@angular/material/progress-bar';
import type * as Monaco from 'monaco-editor/esm/vs/editor/editor.api.js';
import { defineThemes, loadMonaco } from './monaco-loader';

/**
 * A Monaco code editor for expressions, notes and tables as text. Monaco loads on first use; until
 * then (or if it cannot load) a plain text area edits the same value, so editing never waits.
 * The editor grows with its content between `minLines` and `maxLines`.
 */
@Component({
  selector: 'sp-code-editor',
  imports: [MatProgressBar],
  template: `
    <div class="frame" [class.focused]="focused()" [class.ready]="ready()">
      @if (!ready()) {
        <textarea
          class="fallback"
          [attr.aria-label]="ariaLabel()"
          [value]="value()"
          [rows]="minLines()"
          spellcheck="false"
          (input)="fallbackInput($event)"
        ></textarea>
        @if (loading()) {
          <mat-progress-bar class="loading" mode="indeterminate" aria-label="Loading the code editor" />
        }
      }
      <div #host class="host" [hidden]="!ready()"></div>
    </div>
  `,
  styles: `
    :host { display: block; min-width: 0; }
    .frame { position: relative; border: 1px solid var(--mat-sys-outline); border-radius: var(--mat-sys-corner-extra-small); overflow: hidden; background: var(--mat-sys-surface-container-lowest); }
    .frame.focused { border-color: var(--mat-sys-primary); box-shadow: 0 0 0 1px var(--mat-sys-primary); }
    .host { width: 100%; }
    .fallback { box-sizing: border-box; width: 100%; border: none; resize: vertical; padding: 8px; font: 13px/1.5 var(--sp-font-mono); background: transparent; color: var(--mat-sys-on-surface); }
    .fallback:focus { outline: none; }
    .loading { position: absolute; left: 0; right: 0; bottom: 0; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CodeEditor {
  readonly value = input('');
  readonly language = input<'markdown' | 'plaintext' | string>('plaintext');
  readonly ariaLabel = input.required<string>();
  readonly minLines = input(3);
  readonly maxLines = input(20);
  readonly lineNumbers = input(false);
  readonly readOnly = input(false);
  readonly valueChange = output<string>();

  protected readonly ready = signal(false);
  protected readonly loading = signal(true);
  protected readonly focused = signal(false);
  private readonly host = viewChild.required<ElementRef<HTMLElement>>('host');
  private editor: Monaco.editor.IStandaloneCodeEditor | null = null;
  private monaco: typeof Monaco | null = null;
  private settingValue = false;

  constructor() {
    const destroyRef = inject(DestroyRef);
    const media = typeof matchMedia === 'function' ? matchMedia('(prefers-color-scheme: dark)') : null;
    let themes: { light: string; dark: string } | null = null;
    const applyTheme = () => {
      if (this.monaco && themes) this.monaco.editor.setTheme(media?.matches ? themes.dark : themes.light);
    };
    media?.addEventListener('change', applyTheme);
    let destroyed = false;

    afterNextRender(() => {
      loadMonaco()
        .then((monaco) => {
          if (destroyed) return;
          this.monaco = monaco;
          const element = this.host().nativeElement;
          themes = defineThemes(monaco, element);
          const lineHeight = 19;
          const editor = monaco.editor.create(element, {
            value: this.value(),
            language: this.language(),
            ariaLabel: this.ariaLabel(),
            theme: media?.matches ? themes.dark : themes.light,
            automaticLayout: true,
            minimap: { enabled: false },
            lineNumbers: this.lineNumbers() ? 'on' : 'off',
            glyphMargin: false,
            folding: false,
            lineDecorationsWidth: 8,
            lineNumbersMinChars: 3,
            scrollBeyondLastLine: false,
            wordWrap: 'on',
            fontFamily: 'JetBrains Mono, ui-monospace, monospace',
            fontSize: 13,
            lineHeight,
            tabSize: 2,
            renderLineHighlight: 'none',
            overviewRulerLanes: 0,
            hideCursorInOverviewRuler: true,
            scrollbar: { alwaysConsumeMouseWheel: false },
            fixedOverflowWidgets: true,
            // Tables, notes and short expressions: no word completion popping up over the typing.
            quickSuggestions: false,
            wordBasedSuggestions: 'off',
            suggestOnTriggerCharacters: false,
            readOnly: this.readOnly(),
            accessibilitySupport: 'auto',
          });
          this.editor = editor;
          const fit = () => {
            const lines = Math.min(this.maxLines(), Math.max(this.minLines(), editor.getModel()?.getLineCount() ?? 1));
            element.style.height = `${lines * lineHeight + 12}px`;
            editor.layout();
          };
          fit();
          editor.onDidChangeModelContent(() => {
            fit();
            if (!this.settingValue) this.valueChange.emit(editor.getValue());
          });
          editor.onDidFocusEditorText(() => this.focused.set(true));
          editor.onDidBlurEditorText(() => this.focused.set(false));
          this.ready.set(true);
        })
        .catch(() => undefined)
        .finally(() => this.loading.set(false));
    });

    destroyRef.onDestroy(() => {
      destroyed = true;
      media?.removeEventListener('change', applyTheme);
      this.editor?.getModel()?.dispose();
      this.editor?.dispose();
      this.editor = null;
    });

    // A value set from outside (draft restored, table re-parsed) replaces the editor's text.
    effect(() => {
      const value = this.value();
      const editor = this.editor;
      if (!editor || !this.ready() || editor.getValue() === value) return;
      this.settingValue = true;
      editor.setValue(value);
      this.settingValue = false;
    });
  }

  /** Moves the keyboard focus into the editor. */
  focus(): void {
    this.editor?.focus();
  }

  protected fallbackInput(event: Event): void {
    this.valueChange.emit((event.target as HTMLTextAreaElement).value);
  }
}
