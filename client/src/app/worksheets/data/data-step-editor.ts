import { ChangeDetectionStrategy, Component, computed, input, output, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import type { StepResult } from '@shared/engine/result';
import type { InlineColumn, StepOfKind, SummaryStatistics } from '@shared/format/worksheet';
import { CodeEditor } from '../editor/code-editor';
import type { Dataset, UploadAnswer } from '../worksheet-api';
import { DatasetUpload } from './dataset-upload';
import { TablePreview } from './table-preview';
import { TableTextError, cellNumber, columnsToText, keepColumnSettings, parseTableText } from './table-text';

type DataStep = StepOfKind<'data'>;
type Origin = DataStep['params']['origin'];

/**
 * Editing a Data step: a table pasted from a spreadsheet, typed or edited as text (Monaco), or an
 * uploaded file; column types and units; the group column; or summary statistics when the raw
 * values are not available. Every change emits the new step; the table preview pages through it.
 */
@Component({
  selector: 'sp-data-step-editor',
  imports: [
    MatButtonToggleGroup,
    MatButtonToggle,
    MatButton,
    MatIcon,
    MatFormField,
    MatLabel,
    MatHint,
    MatInput,
    MatSelect,
    MatOption,
    CodeEditor,
    DatasetUpload,
    TablePreview,
  ],
  templateUrl: './data-step-editor.html',
  styleUrl: './data-step-editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DataStepEditor {
  readonly step = input.required<DataStep>();
  readonly teamId = input.required<string>();
  readonly result = input<StepResult | null>(null);
  readonly disabled = input(false);
  /** The group column the analysis steps reading this table use (null: none, or they differ). */
  readonly groupColumn = input<string | null>(null);
  readonly stepChange = output<DataStep>();
  readonly groupColumnChange = output<string | null>();

  protected readonly origin = computed<Origin>(() => this.step().params.origin);
  protected readonly inlineColumns = computed(() => {
    const p = this.step().params;
    return p.origin === 'inline' ? p.columns : null;
  });
  protected readonly rowCount = computed(() => Math.max(0, ...(this.inlineColumns() ?? []).map((c) => c.values.length)));
  protected readonly datasetParams = computed(() => {
    const p = this.step().params;
    return p.origin === 'dataset' ? p : null;
  });
  protected readonly summaryParams = computed(() => {
    const p = this.step().params;
    return p.origin === 'summary' ? p : null;
  });

  /** The last upload of this session (skipped rows are only known from it). */
  protected readonly lastUpload = signal<Dataset | null>(null);
  protected readonly datasetColumns = computed(() => {
    const upload = this.lastUpload();
    const params = this.datasetParams();
    if (upload && params && upload.id === params.datasetId) return upload.columns.map((c) => ({ name: c.name, type: c.type }));
    return (this.result()?.data?.columns ?? []).map((c) => ({ name: c.name, type: c.type }));
  });
  protected readonly datasetRowCount = computed(() => {
    const upload = this.lastUpload();
    const params = this.datasetParams();
    if (upload && params && upload.id === params.datasetId) return upload.rowCount;
    return this.result()?.data?.rowCount ?? 0;
  });
  protected readonly previewDataset = computed(() => {
    const params = this.datasetParams();
    if (!params) return null;
    return { teamId: this.teamId(), datasetId: params.datasetId, rowCount: this.datasetRowCount(), columns: this.datasetColumns() };
  });
  protected readonly textColumns = computed(() => {
    const inline = this.inlineColumns();
    if (inline) return inline.filter((c) => c.type === 'text').map((c) => c.name);
    return this.datasetColumns()
      .filter((c) => c.type === 'text')
      .map((c) => c.name);
  });

  protected readonly pasting = signal(false);
  protected readonly editingText = signal(false);
  protected readonly textError = signal<string | null>(null);
  protected readonly notes = signal<string[]>([]);
  protected readonly editorText = signal('');

  // ------------------------------------------------------------------------------------------
  // Origin
  // ------------------------------------------------------------------------------------------

  protected setOrigin(origin: Origin): void {
    if (origin === this.origin()) return;
    if (origin === 'inline') this.emitParams({ origin: 'inline', columns: [{ name: 'value', type: 'number', values: [] }] });
    else if (origin === 'summary') this.emitParams({ origin: 'summary', groups: [{ n: 10, s: 1 }] });
    // 'dataset' is reached by uploading a file.
  }

  protected uploaded(answer: UploadAnswer): void {
    this.lastUpload.set(answer.dataset);
    const notes: string[] = [];
    if (answer.deduplicated) notes.push('This file was uploaded before; the stored copy is used.');
    if (answer.dataset.skippedCount > 0) {
      const first = answer.dataset.skipped.slice(0, 3).map((s) => `line ${s.line}${s.column ? `, column ${s.column}` : ''}: ${s.reason}`);
      notes.push(`${answer.dataset.skippedCount} cell${answer.dataset.skippedCount === 1 ? '' : 's'} could not be read and will be left out (${first.join('; ')}${answer.dataset.skippedCount > 3 ? '; …' : ''}).`);
    }
    this.notes.set(notes);
    // The file's column names go into the step too, so later steps can offer them before the
    // first evaluation; units are added to these entries.
    this.emitParams({
      origin: 'dataset',
      datasetId: answer.dataset.id,
      fileName: answer.dataset.name.slice(0, 260),
      columns: answer.dataset.columns.map((c) => ({ name: c.name })),
    });
  }

  // ------------------------------------------------------------------------------------------
  // Typed-in table
  // ------------------------------------------------------------------------------------------

  protected startPaste(): void {
    this.editingText.set(false);
    this.pasting.set(true);
    this.textError.set(null);
  }

  protected pasted(event: ClipboardEvent): void {
    const text = event.clipboardData?.getData('text/plain');
    if (text === undefined) return;
    event.preventDefault();
    (event.target as HTMLTextAreaElement).value = text;
    this.readText(text, true);
  }

  protected readTypedText(text: string): void {
    this.readText(text, true);
  }

  protected startTextEdit(): void {
    this.pasting.set(false);
    this.textError.set(null);
    this.editorText.set(columnsToText(this.inlineColumns() ?? []));
    this.editingText.set(true);
  }

  protected textEdited(text: string): void {
    this.editorText.set(text);
    this.readText(text, false);
  }

  private readText(text: string, closeWhenDone: boolean): void {
    try {
      const parsed = parseTableText(text);
      const columns = keepColumnSettings(this.inlineColumns() ?? [], parsed.columns);
      this.textError.set(null);
      this.notes.set([
        `Read ${parsed.rowCount} row${parsed.rowCount === 1 ? '' : 's'} and ${parsed.columns.length} column${parsed.columns.length === 1 ? '' : 's'}${parsed.hasHeader ? ' (first row: column names)' : ''}${parsed.decimalComma ? ', decimal commas' : ''}.`,
        ...parsed.notes,
      ]);
      this.emitParams({ origin: 'inline', columns });
      if (closeWhenDone) this.pasting.set(false);
    } catch (error) {
      this.textError.set(error instanceof TableTextError ? error.message : 'The text could not be read as a table.');
    }
  }

  protected renameColumn(index: number, name: string): void {
    const trimmed = name.trim();
    const columns = this.inlineColumns();
    if (!columns || trimmed === '' || trimmed === columns[index]?.name) return;
    if (columns.some((c, i) => i !== index && c.name === trimmed)) {
      this.textError.set(`Another column is already called “${trimmed}”.`);
      return;
    }
    this.textError.set(null);
    this.emitParams({ origin: 'inline', columns: columns.map((c, i) => (i === index ? { ...c, name: trimmed.slice(0, 200) } : c)) });
  }

  protected setColumnType(index: number, type: 'number' | 'text'): void {
    const columns = this.inlineColumns();
    const column = columns?.[index];
    if (!columns || !column || column.type === type) return;
    const next: InlineColumn =
      type === 'text'
        ? { name: column.name, type: 'text', values: column.values.map((v) => (v === null ? null : String(v))) }
        : {
            name: column.name,
            type: 'number',
            values: column.values.map((v) => (v === null ? null : typeof v === 'number' ? v : (cellNumber(v, true) ?? v))),
          };
    this.emitParams({ origin: 'inline', columns: columns.map((c, i) => (i === index ? next : c)) });
  }

  protected setColumnUnit(index: number, unit: string): void {
    const columns = this.inlineColumns();
    const column = columns?.[index];
    if (!columns || !column || column.type !== 'number') return;
    const trimmed = unit.trim().slice(0, 40);
    const { unit: _old, ...rest } = column;
    const next: InlineColumn = trimmed ? { ...rest, unit: trimmed } : rest;
    this.emitParams({ origin: 'inline', columns: columns.map((c, i) => (i === index ? next : c)) });
  }

  protected removeColumn(index: number): void {
    const columns = this.inlineColumns();
    if (!columns || columns.length <= 1) return;
    this.emitParams({ origin: 'inline', columns: columns.filter((_, i) => i !== index) });
  }

  // ------------------------------------------------------------------------------------------
  // Uploaded file
  // ------------------------------------------------------------------------------------------

  protected datasetUnit(name: string): string {
    return this.datasetParams()?.columns?.find((c) => c.name === name)?.unit ?? '';
  }

  protected setDatasetUnit(name: string, unit: string): void {
    const params = this.datasetParams();
    if (!params) return;
    const trimmed = unit.trim().slice(0, 40);
    const known = params.columns ?? [];
    const entry = trimmed ? { name, unit: trimmed } : { name };
    const columns = known.some((c) => c.name === name) ? known.map((c) => (c.name === name ? entry : c)) : [...known, entry];
    this.emitParams({ ...params, columns });
  }

  // ------------------------------------------------------------------------------------------
  // Summary statistics
  // ------------------------------------------------------------------------------------------

  protected summaryError = signal<string | null>(null);

  protected setSummaryCell(index: number, field: 'label' | 'n' | 'mean' | 's', text: string): void {
    const params = this.summaryParams();
    if (!params) return;
    const group = params.groups[index];
    if (!group) return;
    const next: SummaryStatistics = { ...group };
    const t = text.trim();
    if (field === 'label') {
      if (t) next.label = t.slice(0, 200);
      else delete next.label;
    } else {
      const value = t === '' ? null : cellNumber(t, true);
      if (field === 'mean') {
        if (t === '') delete next.mean;
        else if (value === null) return this.summaryError.set(`Group ${index + 1}: the mean must be a number.`);
        else next.mean = value;
      } else if (field === 'n') {
        if (value === null || !Number.isInteger(value) || value < 2) return this.summaryError.set(`Group ${index + 1}: n is a whole number of at least 2.`);
        next.n = value;
      } else {
        if (value === null || value < 0) return this.summaryError.set(`Group ${index + 1}: s is a number ≥ 0.`);
        next.s = value;
      }
    }
    this.summaryError.set(null);
    this.emitParams({ ...params, groups: params.groups.map((g, i) => (i === index ? next : g)) });
  }

  protected addSummaryGroup(): void {
    const params = this.summaryParams();
    if (!params) return;
    this.emitParams({ ...params, groups: [...params.groups, { label: `group ${params.groups.length + 1}`, n: 10, s: 1 }] });
  }

  protected removeSummaryGroup(index: number): void {
    const params = this.summaryParams();
    if (!params || params.groups.length <= 1) return;
    this.emitParams({ ...params, groups: params.groups.filter((_, i) => i !== index) });
  }

  protected setSummaryUnit(unit: string): void {
    const params = this.summaryParams();
    if (!params) return;
    const trimmed = unit.trim().slice(0, 40);
    const { unit: _old, ...rest } = params;
    this.emitParams(trimmed ? { ...rest, unit: trimmed } : rest);
  }

  private emitParams(params: DataStep['params']): void {
    this.stepChange.emit({ ...this.step(), params });
  }
}
