import { ChangeDetectionStrategy, Component, DestroyRef, ElementRef, computed, inject, input, output, signal, viewChild } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { Subscription } from 'rxjs';
import { toApiError } from '../../core/api-error';
import { UploadAnswer, WorksheetApi } from '../worksheet-api';

/** Largest file the service takes (50 MB); bigger ones are refused here before sending. */
export const MAX_UPLOAD_BYTES = 50 * 1024 * 1024;

function sizeText(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} kB`;
  return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
}

/**
 * Uploads a CSV, TSV, TXT or XLSX file to the team's datasets with a progress bar, and reports
 * the stored dataset (its id is the SHA-256 of the bytes). The service detects the delimiter,
 * decimal mark and header row; its message names the line and column of anything it cannot read.
 */
@Component({
  selector: 'sp-dataset-upload',
  imports: [MatButton, MatIcon, MatProgressBar],
  template: `
    <div class="upload" [class.dragging]="dragging()" (dragover)="dragOver($event)" (dragleave)="dragging.set(false)" (drop)="drop($event)">
      <input #file class="sp-visually-hidden" type="file" accept=".csv,.tsv,.txt,.xlsx,text/csv,text/tab-separated-values,text/plain,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet" (change)="picked($event)" [disabled]="disabled() || busy()" aria-label="Table file to upload" data-testid="upload-input" />
      <div class="row">
        <button matButton="tonal" type="button" (click)="file.click()" [disabled]="disabled() || busy()">
          <mat-icon>upload_file</mat-icon>
          {{ label() }}
        </button>
        <span class="sp-muted drop-hint">or drop a CSV, TSV or XLSX file here (up to 50 MB)</span>
      </div>


      @if (progress(); as p) {
        <div class="progress" role="status" aria-live="polite">
          <mat-progress-bar
            [mode]="p.fraction === null ? 'indeterminate' : p.fraction >= 1 ? 'indeterminate' : 'determinate'"
            [value]="(p.fraction ?? 0) * 100"
            [attr.aria-label]="'Uploading ' + p.name"
            data-testid="upload-progress"
          />
          <div class="progress-text">
            <span>{{ p.fraction !== null && p.fraction >= 1 ? 'Reading the table in ' + p.name + '…' : 'Uploading ' + p.name + ': ' + percent(p.fraction) + ' of ' + p.size }}</span>
            <button matButton type="button" (click)="cancel()">Cancel</button>
          </div>
        </div>
      }

      @if (error(); as message) {
        <div class="sp-alert error" role="alert" data-testid="upload-error">
          <mat-icon aria-hidden="true">error</mat-icon>
          <span class="error-text">{{ message }}</span>
          <button matButton type="button" (click)="error.set(null)">Dismiss</button>
        </div>
      }
    </div>
  `,
  styles: `
    .upload { display: flex; flex-direction: column; gap: 8px; padding: 12px; border: 1px dashed var(--mat-sys-outline-variant); border-radius: var(--mat-sys-corner-medium); }
    .upload.dragging { border-color: var(--mat-sys-primary); background: var(--mat-sys-primary-container); }
    .row { display: flex; align-items: center; gap: 12px; flex-wrap: wrap; }
    .drop-hint { font: var(--mat-sys-body-small); }
    .sp-alert.error { align-items: center; }
    .error-text { flex: 1; }
    .progress-text { display: flex; align-items: center; justify-content: space-between; gap: 8px; font: var(--mat-sys-body-small); flex-wrap: wrap; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DatasetUpload {
  readonly teamId = input.required<string>();
  readonly disabled = input(false);
  readonly label = input('Upload a file');
  readonly uploaded = output<UploadAnswer>();

  private readonly api = inject(WorksheetApi);
  private readonly fileInput = viewChild.required<ElementRef<HTMLInputElement>>('file');
  protected readonly dragging = signal(false);
  protected readonly progress = signal<{ name: string; size: string; fraction: number | null } | null>(null);
  protected readonly error = signal<string | null>(null);
  protected readonly busy = computed(() => this.progress() !== null);
  private subscription: Subscription | null = null;

  constructor() {
    inject(DestroyRef).onDestroy(() => this.subscription?.unsubscribe());
  }

  protected percent(fraction: number | null): string {
    return fraction === null ? '…' : `${Math.round(fraction * 100)} %`;
  }

  protected picked(event: Event): void {
    const input = event.target as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (file) this.start(file);
  }

  protected dragOver(event: DragEvent): void {
    if (this.disabled() || this.busy()) return;
    event.preventDefault();
    this.dragging.set(true);
  }

  protected drop(event: DragEvent): void {
    event.preventDefault();
    this.dragging.set(false);
    const file = event.dataTransfer?.files?.[0];
    if (file && !this.disabled() && !this.busy()) this.start(file);
  }

  protected cancel(): void {
    this.subscription?.unsubscribe();
    this.subscription = null;
    this.progress.set(null);
  }

  private start(file: File): void {
    this.error.set(null);
    if (file.size > MAX_UPLOAD_BYTES) {
      this.error.set(`${file.name} is ${sizeText(file.size)}; files up to 50 MB can be uploaded.`);
      return;
    }
    if (file.size === 0) {
      this.error.set(`${file.name} is empty.`);
      return;
    }
    this.progress.set({ name: file.name, size: sizeText(file.size), fraction: 0 });
    this.subscription = this.api.uploadDataset(this.teamId(), file).subscribe({
      next: (event) => {
        if (event.state === 'sending') {
          this.progress.set({ name: file.name, size: sizeText(file.size), fraction: event.fraction });
        } else {
          this.progress.set(null);
          this.uploaded.emit(event.answer);
        }
      },
      error: (error: unknown) => {
        this.progress.set(null);
        this.error.set(toApiError(error).message);
      },
    });
    this.fileInput().nativeElement.blur();
  }
}
