import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogActions, MatDialogClose, MatDialogContent, MatDialogTitle } from '@angular/material/dialog';

export interface ConfirmDialogData {
  title: string;
  message: string;
  confirm: string;
  cancel?: string;
  /** The confirming action destroys something (shown in the error colour). */
  destructive?: boolean;
}

/** A yes/no question; closes with true when confirmed. */
@Component({
  selector: 'sp-confirm-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton],
  template: `
    <h2 mat-dialog-title>{{ data.title }}</h2>
    <mat-dialog-content>
      <p class="message">{{ data.message }}</p>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button matButton type="button" [mat-dialog-close]="false">{{ data.cancel ?? 'Cancel' }}</button>
      <button matButton="filled" type="button" [class.destructive]="data.destructive" [mat-dialog-close]="true" data-testid="confirm">
        {{ data.confirm }}
      </button>
    </mat-dialog-actions>
  `,
  styles: `
    .message { margin: 0; max-width: 52ch; }
    .destructive { --mat-button-filled-container-color: var(--mat-sys-error); --mat-button-filled-label-text-color: var(--mat-sys-on-error); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ConfirmDialog {
  protected readonly data = inject<ConfirmDialogData>(MAT_DIALOG_DATA);
}
