import { ChangeDetectionStrategy, Component, computed, input, output, signal } from '@angular/core';
import { MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import type { Step, StepOfKind } from '@shared/format/worksheet';
import { CodeEditor } from './code-editor';
import { DataStepInfo } from './draft-document';
import { EXPRESSION_LANGUAGE } from './monaco-loader';

type DerivedStep = StepOfKind<'derived-column'>;

/** A Derived column step: the table it extends, the new column's name and unit, and its expression (Monaco). */
@Component({
  selector: 'sp-derived-column-editor',
  imports: [MatFormField, MatLabel, MatHint, MatInput, MatSelect, MatOption, CodeEditor],
  template: `
    @let p = step().params;
    <div class="derived">
      <div class="row">
        <mat-form-field appearance="outline" subscriptSizing="dynamic">
          <mat-label>Table</mat-label>
          <mat-select [value]="p.step" (selectionChange)="set({ step: $event.value })" [disabled]="disabled()">
            @for (data of dataSteps(); track data.id) {
              <mat-option [value]="data.id">{{ data.label }}</mat-option>
            }
          </mat-select>
          @if (engineMessage('params.step'); as message) {
            <mat-hint class="engine">{{ message }}</mat-hint>
          }
        </mat-form-field>
        <mat-form-field appearance="outline" subscriptSizing="dynamic">
          <mat-label>New column name</mat-label>
          <input matInput [value]="p.name" (change)="rename($any($event.target).value)" [disabled]="disabled()" autocomplete="off" />
          @if (nameError(); as message) {
            <mat-hint class="engine">{{ message }}</mat-hint>
          }
        </mat-form-field>
        <mat-form-field appearance="outline" subscriptSizing="dynamic">
          <mat-label>Unit</mat-label>
          <input matInput [value]="p.unit ?? ''" (change)="setUnit($any($event.target).value)" [disabled]="disabled()" autocomplete="off" />
        </mat-form-field>
      </div>
      <div class="expression">
        <span class="label" id="{{ step().id }}-expression-label">Expression</span>
        <sp-code-editor
          [value]="p.expression"
          [language]="expressionLanguage"
          [ariaLabel]="'Expression of the new column ' + p.name"
          [minLines]="2"
          [maxLines]="8"
          (valueChange)="set({ expression: $event.slice(0, 2000) })"
        />
        @if (engineMessage('params.expression'); as message) {
          <p class="engine" role="alert">{{ message }}</p>
        }
        <p class="sp-muted hint">
          Columns: @for (c of columns(); track c.name; let last = $last) {<code>{{ c.name }}</code>{{ last ? '' : ', ' }}} @empty {none known yet}.
          Use + − * / ^, parentheses and functions such as sqrt, abs, log10, round; col("name with spaces") for other names;
          convert(x, "mm", "um") for units.
        </p>
      </div>
    </div>
  `,
  styles: `
    .derived { display: flex; flex-direction: column; gap: 12px; }
    .row { display: grid; grid-template-columns: repeat(auto-fill, minmax(200px, 1fr)); gap: 12px; }
    .row mat-form-field { width: 100%; }
    .expression { display: flex; flex-direction: column; gap: 4px; }
    .label { font: var(--mat-sys-label-large); color: var(--mat-sys-on-surface-variant); }
    .engine { margin: 0; color: var(--mat-sys-error); font: var(--mat-sys-body-small); }
    .hint { margin: 0; font: var(--mat-sys-body-small); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DerivedColumnEditor {
  readonly step = input.required<DerivedStep>();
  readonly dataSteps = input.required<readonly DataStepInfo[]>();
  readonly disabled = input(false);
  readonly engineError = input<{ field: string; message: string } | null>(null);
  readonly stepChange = output<Step>();

  protected readonly expressionLanguage = EXPRESSION_LANGUAGE;
  protected readonly nameError = signal<string | null>(null);
  protected readonly columns = computed(() => this.dataSteps().find((d) => d.id === this.step().params.step)?.columns ?? []);

  protected engineMessage(prefix: string): string | null {
    const error = this.engineError();
    return error && (error.field === prefix || error.field.startsWith(`${prefix}.`)) ? error.message : null;
  }

  protected set(change: Partial<DerivedStep['params']>): void {
    if (this.disabled()) return;
    const step = this.step();
    this.stepChange.emit({ ...step, params: { ...step.params, ...change } });
  }

  protected rename(name: string): void {
    const trimmed = name.trim();
    if (trimmed === '') {
      this.nameError.set('Give the new column a name.');
      return;
    }
    this.nameError.set(null);
    this.set({ name: trimmed.slice(0, 200) });
  }

  protected setUnit(unit: string): void {
    const step = this.step();
    const { unit: _old, ...rest } = step.params;
    const trimmed = unit.trim().slice(0, 40);
    this.stepChange.emit({ ...step, params: trimmed ? { ...rest, unit: trimmed } : rest });
  }
}
