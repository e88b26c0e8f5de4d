import { ChangeDetectionStrategy, Component, computed, effect, input, output, signal, untracked } from '@angular/core';
import { FormArray, FormControl, FormGroup, ReactiveFormsModule, ValidatorFn, Validators } from '@angular/forms';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import type { InlineSummarySource, Source, Step, StepSource, SummaryStatistics } from '@shared/format/worksheet';
import { GROUPED_KINDS } from '../results/step-kinds';
import { DataStepInfo, stableStringify } from './draft-document';

type StepWithSource = Extract<Step, { params: { source: Source } }>;

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
function num(text: string): number | null {
  const t = text.trim().replace(/,(?=\d+$)/, '.');
  return NUMBER.test(t) ? Number(t) : null;
}

const countValidator: ValidatorFn = (c) => {
  const n = num(String(c.value ?? ''));
  if (String(c.value ?? '').trim() === '') return { message: 'Enter n.' };
  return n !== null && Number.isInteger(n) && n >= 2 ? null : { message: 'n is a whole number of at least 2.' };
};
const sdValidator: ValidatorFn = (c) => {
  if (String(c.value ?? '').trim() === '') return { message: 'Enter s.' };
  const n = num(String(c.value ?? ''));
  return n !== null && n >= 0 ? null : { message: 's is a number ≥ 0.' };
};
const meanValidator: ValidatorFn = (c) => {
  if (String(c.value ?? '').trim() === '') return null;
  return num(String(c.value)) !== null ? null : { message: 'Enter a number or leave empty.' };
};

type GroupForm = FormGroup<{ label: FormControl<string>; n: FormControl<string>; mean: FormControl<string>; s: FormControl<string> }>;

function groupForm(g: SummaryStatistics | null): GroupForm {
  return new FormGroup({
    label: new FormControl(g?.label ?? '', { nonNullable: true, validators: [Validators.maxLength(200)] }),
    n: new FormControl(g ? String(g.n) : '', { nonNullable: true, validators: [countValidator] }),
    mean: new FormControl(g?.mean !== undefined && g?.mean !== null ? String(g.mean) : '', { nonNullable: true, validators: [meanValidator] }),
    s: new FormControl(g ? String(g.s) : '', { nonNullable: true, validators: [sdValidator] }),
  });
}

/**
 * Where an analysis step takes its measurements from: a column of an earlier data step (with an
 * optional group column), or summary statistics typed into the step.
 */
@Component({
  selector: 'sp-source-fields',
  imports: [
    ReactiveFormsModule,
    MatFormField,
    MatLabel,
    MatHint,
    MatError,
    MatSelect,
    MatOption,
    MatInput,
    MatButton,
    MatIconButton,
    MatIcon,
    MatButtonToggleGroup,
    MatButtonToggle,
  ],
  templateUrl: './source-fields.html',
  styleUrl: './source-fields.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SourceFields {
  readonly step = input.required<StepWithSource>();
  readonly dataSteps = input.required<readonly DataStepInfo[]>();
  readonly disabled = input(false);
  readonly engineError = input<{ field: string; message: string } | null>(null);
  readonly stepChange = output<Step>();

  protected readonly source = computed(() => this.step().params.source);
  protected readonly mode = computed<'step' | 'summary'>(() => ('summary' in this.source() ? 'summary' : 'step'));
  protected readonly stepSource = computed(() => {
    const source = this.source();
    return 'step' in source ? source : null;
  });
  protected readonly selected = computed(() => {
    const source = this.stepSource();
    return source ? (this.dataSteps().find((d) => d.id === source.step) ?? null) : null;
  });
  protected readonly numericColumns = computed(() => (this.selected()?.columns ?? []).filter((c) => c.type === 'number'));
  /** The chosen column when it is not among the known numeric ones (not evaluated yet, or gone). */
  protected readonly unknownColumn = computed(() => {
    const column = this.stepSource()?.column;
    return column && !this.numericColumns().some((c) => c.name === column) ? column : null;
  });
  protected readonly groupColumns = computed(() => (this.selected()?.columns ?? []).filter((c) => c.name !== this.stepSource()?.column));
  protected readonly grouped = computed(() => GROUPED_KINDS.has(this.step().kind));
  protected readonly groupsText = computed(() => this.stepSource()?.groups?.join(', ') ?? '');
  protected readonly needsTwo = computed(() => this.step().kind === 'two-sample-ratio');
  protected readonly missingStep = computed(() => {
    const source = this.stepSource();
    return source !== null && this.selected() === null;
  });

  protected readonly summaryForm = new FormGroup({
    unit: new FormControl('', { nonNullable: true, validators: [Validators.maxLength(40)] }),
    groups: new FormArray<GroupForm>([]),
  });
  protected readonly summaryInvalid = signal(false);
  private lastEmitted: Step | null = null;

  constructor() {
    effect(() => {
      const step = this.step();
      const disabled = this.disabled();
      untracked(() => {
        if (step !== this.lastEmitted) this.syncSummary(step.params.source);
        if (disabled) this.summaryForm.disable({ emitEvent: false });
        else this.summaryForm.enable({ emitEvent: false });
      });
    });
    this.summaryForm.valueChanges.subscribe(() => this.summaryEdited());
  }

  protected engineMessage(prefix: string): string | null {
    const error = this.engineError();
    return error && (error.field === prefix || error.field.startsWith(`${prefix}.`)) ? error.message : null;
  }

  protected setMode(mode: 'step' | 'summary'): void {
    if (mode === this.mode()) return;
    if (mode === 'summary') {
      const groups: SummaryStatistics[] = this.needsTwo()
        ? [
            { label: 'first', n: 10, s: 1 },
            { label: 'second', n: 10, s: 1 },
          ]
        : [{ n: 10, s: 1 }];
      this.emitSource({ summary: groups.length === 1 ? groups[0]! : groups });
    } else {
      const first = this.dataSteps()[this.dataSteps().length - 1];
      if (!first) return;
      const column = first.columns.find((c) => c.type === 'number');
      this.emitSource(column ? { step: first.id, column: column.name } : { step: first.id });
    }
  }

  protected chooseStep(stepId: string): void {
    const info = this.dataSteps().find((d) => d.id === stepId);
    const column = info?.columns.find((c) => c.type === 'number');
    this.emitSource(column ? { step: stepId, column: column.name } : { step: stepId });
  }

  protected chooseColumn(column: string): void {
    const source = this.stepSource();
    if (!source) return;
    this.emitSource({ ...source, column });
  }

  protected chooseGroupBy(column: string): void {
    const source = this.stepSource();
    if (!source) return;
    const { groupBy: _g, groups: _gs, ...rest } = source;
    this.emitSource(column ? { ...rest, groupBy: column } : rest);
  }

  protected setGroups(text: string): void {
    const source = this.stepSource();
    if (!source) return;
    const groups = text
      .split(',')
      .map((g) => g.trim())
      .filter((g) => g !== '');
    const { groups: _old, ...rest } = source;
    this.emitSource(groups.length > 0 ? { ...rest, groups } : rest);
  }

  protected addGroup(): void {
    this.summaryForm.controls.groups.push(groupForm({ label: `group ${this.summaryForm.controls.groups.length + 1}`, n: 10, s: 1 }));
  }

  protected removeGroup(index: number): void {
    if (this.summaryForm.controls.groups.length <= 1) return;
    this.summaryForm.controls.groups.removeAt(index);
  }

  private syncSummary(source: Source): void {
    if (!('summary' in source)) return;
    const groups = Array.isArray(source.summary) ? source.summary : [source.summary];
    const current = this.readSummary();
    if (current && stableStringify(current) === stableStringify(source)) return;
    const array = this.summaryForm.controls.groups;
    array.clear({ emitEvent: false });
    for (const g of groups) array.push(groupForm(g), { emitEvent: false });
    this.summaryForm.controls.unit.setValue(source.unit ?? '', { emitEvent: false });
  }

  private readSummary(): InlineSummarySource | null {
    const groups: SummaryStatistics[] = [];
    for (const g of this.summaryForm.controls.groups.controls) {
      if (g.invalid) return null;
      const value = g.getRawValue();
      const entry: SummaryStatistics = { n: num(value.n)!, s: num(value.s)! };
      if (value.label.trim()) entry.label = value.label.trim();
      const mean = value.mean.trim() === '' ? null : num(value.mean);
      if (mean !== null) entry.mean = mean;
      groups.push(entry);
    }
    if (groups.length === 0) return null;
    const unit = this.summaryForm.controls.unit.value.trim();
    const source: InlineSummarySource = { summary: groups.length === 1 ? groups[0]! : groups };
    if (unit) source.unit = unit;
    return source;
  }

  private summaryEdited(): void {
    if (this.mode() !== 'summary') return;
    this.summaryForm.markAllAsTouched();
    const source = this.readSummary();
    this.summaryInvalid.set(source === null);
    if (!source || stableStringify(source) === stableStringify(this.source())) return;
    this.emitSource(source);
  }

  private emitSource(source: Source): void {
    const step = this.step();
    const next = { ...step, params: { ...step.params, source } } as Step;
    this.lastEmitted = next;
    this.stepChange.emit(next);
  }

  protected isStepSource(source: Source): source is StepSource {
    return 'step' in source;
  }
}
