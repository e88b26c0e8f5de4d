import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import type { Step, StepOfKind } from '@shared/format/worksheet';
import { CodeEditor } from './code-editor';

type NoteStep = StepOfKind<'note'>;

/** A Note step: Markdown with TeX formulas ($…$, $$…$$) edited in Monaco; the rendered note is in its findings. */
@Component({
  selector: 'sp-note-editor',
  imports: [CodeEditor],
  template: `
    <div class="note">
      <sp-code-editor
        [value]="step().params.markdown"
        language="markdown"
        [ariaLabel]="'Text of the note ' + (step().title || '')"
        [minLines]="4"
        [maxLines]="24"
        (valueChange)="changed($event)"
      />
      <p class="sp-muted hint">Markdown: **bold**, *italic*, lists, tables; formulas in TeX between $ … $ or $$ … $$.</p>
    </div>
  `,
  styles: `
    .note { display: flex; flex-direction: column; gap: 4px; }
    .hint { margin: 0; font: var(--mat-sys-body-small); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NoteEditor {
  readonly step = input.required<NoteStep>();
  readonly disabled = input(false);
  readonly stepChange = output<Step>();

  protected changed(markdown: string): void {
    if (this.disabled()) return;
    const step = this.step();
    this.stepChange.emit({ ...step, params: { markdown: markdown.slice(0, 100_000) } });
  }
}
