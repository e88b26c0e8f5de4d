import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogActions, MatDialogContent, MatDialogRef, MatDialogTitle } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { toApiError } from '../../core/api-error';
import type { CompareResult, RevisionSummary } from '../worksheet-api';
import { WorksheetApi } from '../worksheet-api';

export interface ConflictDialogData {
  baseRevisionId: string;
  baseNumber: number;
  head: RevisionSummary;
}

export type ConflictChoice = 'fork' | 'reload' | undefined;

/**
 * A save refused because a newer revision was saved meanwhile: shows what that revision changed
 * (base → head) and offers to keep the edit as a fork, or to drop it and load the newer revision.
 */
@Component({
  selector: 'sp-conflict-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogActions, MatButton, MatIcon, MatProgressBar, DatePipe],
  template: `
    <h2 mat-dialog-title>Someone saved first</h2>
    <mat-dialog-content>
      <p class="lead" data-testid="conflict-message">
        {{ data.head.author.name }} saved revision {{ data.head.number }} on {{ data.head.createdAt | date: 'medium' }}
        @if (data.head.message) {
          (“{{ data.head.message }}”)
        }
        while you were editing revision {{ data.baseNumber }}. Your edit was not saved; nothing was overwritten.
      </p>
      @if (loading()) {
        <mat-progress-bar mode="indeterminate" aria-label="Comparing the revisions" />
      }
      @if (error(); as text) {
        <p class="sp-muted">The changes could not be listed: {{ text }}</p>
      }
      @if (comparison(); as c) {
        <h3 class="sub">What revision {{ data.head.number }} changed</h3>
        @if (c.identical) {
          <p>Its content is the same as revision {{ data.baseNumber }}.</p>
        } @else {
          <ul class="changes">
            @if (c.title) {
              <li>Title: “{{ c.title.from }}” → “{{ c.title.to }}”</li>
            }
            @for (step of c.steps; track step.stepId + step.change) {
              <li>
                <strong>{{ step.label }}</strong>: {{ changeWords[step.change] }}
                @if (step.params.length > 0) {
                  ({{ step.params.length }} setting{{ step.params.length === 1 ? '' : 's' }})
                }
              </li>
            }
            @for (data of c.data; track data.stepId) {
              <li><strong>{{ data.label }}</strong>: data changed ({{ data.rowsFrom }} → {{ data.rowsTo }} rows)</li>
            }
            @if (c.summary.resultsChanged > 0) {
              <li>{{ c.summary.resultsChanged }} result value{{ c.summary.resultsChanged === 1 ? '' : 's' }} changed</li>
            }
            @for (flip of c.conclusions; track flip.stepId + flip.id) {
              @if (flip.flipped) {
                <li class="flip"><mat-icon aria-hidden="true">swap_horiz</mat-icon> {{ flip.label }}: “{{ flip.statement }}” flipped</li>
              }
            }
          </ul>
        }
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button matButton type="button" (click)="ref.close()">Keep editing</button>
      <button matButton="outlined" type="button" (click)="ref.close('reload')" data-testid="conflict-reload">Discard my edit, load revision {{ data.head.number }}</button>
      <button matButton="filled" type="button" (click)="ref.close('fork')" data-testid="conflict-fork">
        <mat-icon>fork_right</mat-icon>
        Keep my edit as a fork
      </button>
    </mat-dialog-actions>
  `,
  styles: `
    .lead { margin: 0 0 12px; max-width: 60ch; }
    .sub { margin: 12px 0 4px; font: var(--mat-sys-title-small); }
    .changes { margin: 0; padding-left: 20px; }
    .flip { color: var(--mat-sys-error); list-style: none; margin-left: -20px; display: flex; gap: 4px; align-items: center; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ConflictDialog {
  protected readonly data = inject<ConflictDialogData>(MAT_DIALOG_DATA);
  protected readonly ref = inject<MatDialogRef<ConflictDialog, ConflictChoice>>(MatDialogRef);
  protected readonly comparison = signal<CompareResult | null>(null);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  protected readonly changeWords: Record<string, string> = {
    added: 'added',
    removed: 'removed',
    moved: 'moved',
    changed: 'changed',
    moved_and_changed: 'moved and changed',
  };

  constructor() {
    inject(WorksheetApi)
      .compare(this.data.baseRevisionId, this.data.head.id)
      .then((answer) => this.comparison.set(answer.comparison))
      .catch((error: unknown) => this.error.set(toApiError(error).message))
      .finally(() => this.loading.set(false));
  }
}
