import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogActions, MatDialogContent, MatDialogRef, MatDialogTitle } from '@angular/material/dialog';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import type { Revision } from '../worksheet-api';
import { HeadMovedError, WorksheetDraft } from './worksheet-draft';
import { toApiError } from '../../core/api-error';

export interface SaveDialogData {
  draft: WorksheetDraft;
  baseNumber: number;
}

/** What the save dialog closes with: the new revision, a conflict to resolve, or nothing (cancelled). */
export type SaveDialogResult = { saved: Revision } | { conflict: HeadMovedError } | undefined;

/** Saves the draft as a new revision with a message saying what changed. */
@Component({
  selector: 'sp-save-dialog',
  imports: [ReactiveFormsModule, MatDialogTitle, MatDialogContent, MatDialogActions, MatButton, MatFormField, MatLabel, MatHint, MatError, MatInput, MatIcon, MatProgressBar],
  template: `
    <h2 mat-dialog-title>Save a new revision</h2>
    <form [formGroup]="form" (ngSubmit)="save()" novalidate>
      <mat-dialog-content>
        <p class="sp-muted intro">
          Revision {{ data.baseNumber }} stays as it is; the draft becomes revision {{ data.baseNumber + 1 }} if nobody saved in between.
        </p>
        <mat-form-field appearance="outline" class="message">
          <mat-label>What changed?</mat-label>
          <textarea matInput formControlName="message" rows="3" cdkFocusInitial data-testid="save-message"></textarea>
          <mat-hint align="end">{{ message.value.length }} / 500</mat-hint>
          @if (message.hasError('maxlength')) {
            <mat-error>A message has at most 500 characters.</mat-error>
          }
        </mat-form-field>
        @if (saving()) {
          <mat-progress-bar mode="indeterminate" aria-label="Saving and evaluating" />
        }
        @if (error(); as text) {
          <p class="sp-alert error" role="alert">
            <mat-icon aria-hidden="true">error</mat-icon>
            <span>{{ text }}</span>
          </p>
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button matButton type="button" (click)="ref.close()" [disabled]="saving()">Cancel</button>
        <button matButton="filled" type="submit" [disabled]="saving()" data-testid="save-confirm">Save revision</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .intro { margin: 0 0 12px; max-width: 52ch; }
    .message { width: 100%; min-width: min(420px, 70vw); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SaveDialog {
  protected readonly data = inject<SaveDialogData>(MAT_DIALOG_DATA);
  protected readonly ref = inject<MatDialogRef<SaveDialog, SaveDialogResult>>(MatDialogRef);
  protected readonly message = new FormControl('', { nonNullable: true, validators: [Validators.maxLength(500)] });
  protected readonly form = new FormGroup({ message: this.message });
  protected readonly saving = signal(false);
  protected readonly error = signal<string | null>(null);

  protected async save(): Promise<void> {
    if (this.saving()) return;
    this.message.markAsTouched();
    if (this.message.invalid) return;
    this.saving.set(true);
    this.error.set(null);
    this.ref.disableClose = true;
    try {
      const saved = await this.data.draft.save(this.message.value.trim());
      this.ref.close({ saved });
    } catch (error) {
      if (error instanceof HeadMovedError) {
        this.ref.close({ conflict: error });
        return;
      }
      const apiError = toApiError(error);
      const fields = apiError.fieldErrors.map((f) => `${f.field}: ${f.message}`).join(' ');
      this.error.set(fields ? `${apiError.message} ${fields}` : apiError.message);
    } finally {
      this.saving.set(false);
      this.ref.disableClose = false;
    }
  }
}
