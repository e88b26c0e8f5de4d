import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, output, untracked } from '@angular/core';
import { AbstractControl, FormControl, FormGroup, ReactiveFormsModule, ValidationErrors, ValidatorFn } from '@angular/forms';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import type { Step } from '@shared/format/worksheet';
import { stableStringify } from './draft-document';
import { ParamField, allFieldsOf, applyField, fieldKey, fieldText, fieldsFor, getPath, parseField } from './param-fields';

type FieldValue = string | string[] | boolean;

function fieldValidator(field: ParamField): ValidatorFn {
  return (control: AbstractControl<FieldValue>): ValidationErrors | null => {
    const parsed = parseField(field, control.value);
    return parsed.ok ? null : { param: parsed.message };
  };
}

/**
 * The settings of an analysis step as Material fields (param-fields.ts says which, and how each
 * is read and checked). Every valid edit emits the changed step at once; an invalid one shows its
 * message under the field and leaves the step as it was.
 */
@Component({
  selector: 'sp-param-fields-form',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatError, MatHint, MatSuffix, MatInput, MatSelect, MatOption, MatCheckbox],
  template: `
    <div class="fields" [formGroup]="form">
      @for (field of visible(); track key(field)) {
        @if (form.controls[key(field)]; as control) {
        @switch (field.kind) {
          @case ('toggle') {
            <mat-checkbox class="toggle" [formControlName]="key(field)">{{ field.label }}</mat-checkbox>
          }
          @case ('select') {
            <mat-form-field appearance="outline" subscriptSizing="dynamic" [class.wide]="field.wide">
              <mat-label>{{ field.label }}</mat-label>
              <mat-select [formControlName]="key(field)">
                @for (option of field.options; track option.value) {
                  <mat-option [value]="option.value">{{ option.label }}</mat-option>
                }
              </mat-select>
              @if (engineMessage(field); as message) {
                <mat-hint class="engine">{{ message }}</mat-hint>
              }
              <mat-error>{{ control.errors?.['param'] }}</mat-error>
            </mat-form-field>
          }
          @case ('multi-select') {
            <mat-form-field appearance="outline" subscriptSizing="dynamic" class="wide">
              <mat-label>{{ field.label }}</mat-label>
              <mat-select [formControlName]="key(field)" multiple>
                @for (option of field.options; track option.value) {
                  <mat-option [value]="option.value">{{ option.label }}</mat-option>
                }
              </mat-select>
              <mat-error>{{ control.errors?.['param'] }}</mat-error>
            </mat-form-field>
          }
          @default {
            <mat-form-field appearance="outline" subscriptSizing="dynamic">
              <mat-label>{{ field.label }}</mat-label>
              <input
                matInput
                [formControlName]="key(field)"
                [attr.inputmode]="field.kind === 'text' ? null : 'decimal'"
                autocomplete="off"
                [attr.data-field]="field.path"
              />
              @if (field.unitSuffix && unit()) {
                <span matTextSuffix class="unit">{{ unit() }}</span>
              }
              @if (engineMessage(field); as message) {
                <mat-hint class="engine">{{ message }}</mat-hint>
              } @else if (field.hint) {
                <mat-hint>{{ field.hint }}</mat-hint>
              }
              <mat-error>{{ control.errors?.['param'] }}</mat-error>
            </mat-form-field>
          }
        }
        }
      }
    </div>
  `,
  styles: `
    .fields { display: grid; grid-template-columns: repeat(auto-fill, minmax(200px, 1fr)); gap: 12px 12px; align-items: start; }
    .wide { grid-column: 1 / -1; }
    .toggle { grid-column: 1 / -1; }
    mat-form-field { width: 100%; }
    .unit { padding-left: 4px; font-family: var(--sp-font-mono); color: var(--mat-sys-on-surface-variant); }
    .engine { color: var(--mat-sys-error); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ParamFieldsForm {
  readonly step = input.required<Step>();
  readonly unit = input<string | undefined>(undefined);
  readonly disabled = input(false);
  /** The engine's message for a field of this step ("params.levels.0"), shown under that field. */
  readonly engineError = input<{ field: string; message: string } | null>(null);
  readonly stepChange = output<Step>();

  // Controls are added and removed by kind, so the group is typed by a string index.
  protected readonly form = new FormGroup<{ [key: string]: FormControl<FieldValue> }>({});
  protected readonly visible = computed(() => fieldsFor(this.step()));
  private lastEmitted: Step | null = null;
  private builtFor: string | null = null;

  constructor() {
    const destroyRef = inject(DestroyRef);
    effect(() => {
      const step = this.step();
      const disabled = this.disabled();
      untracked(() => {
        this.build(step, destroyRef);
        if (step !== this.lastEmitted) this.sync(step);
        if (disabled) this.form.disable({ emitEvent: false });
        else this.form.enable({ emitEvent: false });
      });
    });
  }

  protected key(field: ParamField): string {
    return fieldKey(field, this.step().kind);
  }

  protected engineMessage(field: ParamField): string | null {
    const error = this.engineError();
    if (!error) return null;
    return error.field === field.path || error.field.startsWith(`${field.path}.`) ? error.message : null;
  }

  /** One control per field the kind can show (built once per kind). */
  private build(step: Step, destroyRef: DestroyRef): void {
    if (this.builtFor === step.kind) return;
    this.builtFor = step.kind;
    for (const name of Object.keys(this.form.controls)) (this.form as FormGroup).removeControl(name, { emitEvent: false });
    for (const field of allFieldsOf(step.kind)) {
      const control = new FormControl<FieldValue>(fieldText(step, field), { nonNullable: true, validators: fieldValidator(field) });
      const subscription = control.valueChanges.subscribe((value) => this.edited(field, value));
      destroyRef.onDestroy(() => subscription.unsubscribe());
      this.form.addControl(fieldKey(field, step.kind), control, { emitEvent: false });
    }
  }

  /** Shows a step that changed from outside (another field, a restored draft, a what-if applied). */
  private sync(step: Step): void {
    for (const field of allFieldsOf(step.kind)) {
      const control = this.form.controls[fieldKey(field, step.kind)];
      if (!control) continue;
      const parsed = parseField(field, control.value);
      const stored = getPath(step, field.path);
      if (parsed.ok && stableStringify(parsed.value) === stableStringify(stored)) continue;
      control.setValue(fieldText(step, field), { emitEvent: false });
      control.updateValueAndValidity({ emitEvent: false });
    }
  }

  private edited(field: ParamField, value: FieldValue): void {
    const step = this.step();
    if (!fieldsFor(step).includes(field)) return;
    const control = this.form.controls[fieldKey(field, step.kind)];
    control?.markAsTouched();
    const applied = applyField(step, field, value);
    if ('message' in applied) return;
    if (stableStringify(applied.step) === stableStringify(step)) return;
    this.lastEmitted = applied.step;
    this.stepChange.emit(applied.step);
  }
}
