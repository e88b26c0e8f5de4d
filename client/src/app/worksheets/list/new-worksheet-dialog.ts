import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MAT_DIALOG_DATA, MatDialogActions, MatDialogContent, MatDialogRef, MatDialogTitle } from '@angular/material/dialog';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import { toApiError } from '../../core/api-error';
import { showServerErrors } from '../../core/server-errors';
import type { TeamSummary } from '../../teams/teams';
import { ExampleSummary, WorksheetApi, WorksheetWithHead } from '../worksheet-api';

export interface NewWorksheetData {
  /** Teams in which the user may create worksheets (editor or owner). */
  teams: TeamSummary[];
  /** Open on "import a file" instead of "new". */
  mode: 'new' | 'import';
}

/** A new worksheet in one of the user's teams: blank, from an example, or imported from an exported file. */
@Component({
  selector: 'sp-new-worksheet-dialog',
  imports: [
    ReactiveFormsModule,
    MatDialogTitle,
    MatDialogContent,
    MatDialogActions,
    MatButton,
    MatButtonToggleGroup,
    MatButtonToggle,
    MatFormField,
    MatLabel,
    MatHint,
    MatError,
    MatInput,
    MatSelect,
    MatOption,
    MatIcon,
    MatProgressBar,
  ],
  template: `
    <h2 mat-dialog-title>{{ mode() === 'import' ? 'Import a worksheet' : 'New worksheet' }}</h2>
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
      <mat-dialog-content class="content">
        <mat-button-toggle-group
          hideSingleSelectionIndicator
          [value]="start()"
          (change)="start.set($event.value)"
          aria-label="How to start"
          class="start"
        >
          <mat-button-toggle value="blank">Blank</mat-button-toggle>
          <mat-button-toggle value="example" [disabled]="examples().length === 0">From an example</mat-button-toggle>
          <mat-button-toggle value="import">Import a file</mat-button-toggle>
        </mat-button-toggle-group>

        <mat-form-field appearance="outline">
          <mat-label>Team</mat-label>
          <mat-select formControlName="teamId" data-testid="new-team">
            @for (team of data.teams; track team.id) {
              <mat-option [value]="team.id">{{ team.name }}</mat-option>
            }
          </mat-select>
          <mat-error>Choose the team the worksheet belongs to.</mat-error>
        </mat-form-field>

        @if (start() === 'example') {
          <mat-form-field appearance="outline">
            <mat-label>Example</mat-label>
            <mat-select formControlName="exampleId">
              @for (example of examples(); track example.id) {
                <mat-option [value]="example.id">{{ example.title }}</mat-option>
              }
            </mat-select>
            @if (selectedExample(); as example) {
              <mat-hint>{{ example.description }}</mat-hint>
            }
            <mat-error>Choose an example.</mat-error>
          </mat-form-field>
        }

        @if (start() === 'import') {
          <div class="file">
            <input #file class="sp-visually-hidden" type="file" accept=".json,application/json" (change)="picked($event)" aria-label="Worksheet file to import" data-testid="import-input" />
            <button matButton="tonal" type="button" (click)="file.click()">
              <mat-icon>upload_file</mat-icon>
              Choose a file
            </button>
            <span class="sp-muted">{{ fileName() ?? 'An exported .spreadproof.json file' }}</span>
          </div>
        } @else {
          <mat-form-field appearance="outline">
            <mat-label>Title</mat-label>
            <input matInput formControlName="title" autocomplete="off" data-testid="new-title" />
            <mat-hint>{{ start() === 'example' ? 'Leave empty to keep the example’s title' : 'You can change it later' }}</mat-hint>
            <mat-error>A title has 1 to 200 characters.</mat-error>
          </mat-form-field>
        }

        @if (busy()) {
          <mat-progress-bar mode="indeterminate" aria-label="Creating the worksheet" />
        }
        @if (error(); as message) {
          <p class="sp-alert error" role="alert" data-testid="new-error">
            <mat-icon aria-hidden="true">error</mat-icon>
            <span>{{ message }}</span>
          </p>
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button matButton type="button" (click)="ref.close()" [disabled]="busy()">Cancel</button>
        <button matButton="filled" type="submit" [disabled]="busy()" data-testid="new-create">
          {{ start() === 'import' ? 'Import' : 'Create' }}
        </button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .content { display: flex; flex-direction: column; gap: 8px; min-width: min(440px, 80vw); }
    .start { align-self: flex-start; margin-bottom: 8px; flex-wrap: wrap; }
    mat-form-field { width: 100%; }
    .file { display: flex; align-items: center; gap: 12px; flex-wrap: wrap; margin-bottom: 12px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NewWorksheetDialog {
  protected readonly data = inject<NewWorksheetData>(MAT_DIALOG_DATA);
  protected readonly ref = inject<MatDialogRef<NewWorksheetDialog, WorksheetWithHead>>(MatDialogRef);
  private readonly api = inject(WorksheetApi);

  protected readonly start = signal<'blank' | 'example' | 'import'>(this.data.mode === 'import' ? 'import' : 'blank');
  protected readonly mode = computed(() => (this.start() === 'import' ? 'import' : 'new'));
  protected readonly examples = signal<ExampleSummary[]>([]);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly fileName = signal<string | null>(null);
  private file: File | null = null;

  protected readonly form = new FormGroup({
    teamId: new FormControl(this.data.teams.length === 1 ? this.data.teams[0]!.id : '', { nonNullable: true, validators: [Validators.required] }),
    exampleId: new FormControl('', { nonNullable: true }),
    title: new FormControl('', { nonNullable: true, validators: [Validators.maxLength(200)] }),
  });
  private readonly exampleId = signal('');
  protected readonly selectedExample = computed(() => this.examples().find((e) => e.id === this.exampleId()) ?? null);

  constructor() {
    this.form.controls.exampleId.valueChanges.subscribe((id) => this.exampleId.set(id));
    this.api
      .examples()
      .then((examples) => {
        this.examples.set(examples);
        if (examples[0]) this.form.controls.exampleId.setValue(examples[0].id);
      })
      .catch(() => this.examples.set([]));
  }

  protected picked(event: Event): void {
    const input = event.target as HTMLInputElement;
    this.file = input.files?.[0] ?? null;
    this.fileName.set(this.file?.name ?? null);
    this.error.set(null);
  }

  protected async submit(): Promise<void> {
    if (this.busy()) return;
    this.form.markAllAsTouched();
    if (this.form.invalid) return;
    const { teamId, exampleId, title } = this.form.getRawValue();
    const start = this.start();
    if (start === 'import' && !this.file) {
      this.error.set('Choose the exported worksheet file to import.');
      return;
    }
    if (start === 'example' && !exampleId) {
      this.error.set('Choose an example.');
      return;
    }
    this.busy.set(true);
    this.error.set(null);
    try {
      const created =
        start === 'import'
          ? await this.api.importFile(teamId, this.file!, this.file!.name)
          : start === 'example'
            ? await this.api.createFromExample(teamId, exampleId, title.trim() || undefined)
            : await this.api.createBlank(teamId, title.trim() || undefined);
      this.ref.close(created);
    } catch (error) {
      this.error.set(showServerErrors(this.form, toApiError(error)));
    } finally {
      this.busy.set(false);
    }
  }
}
