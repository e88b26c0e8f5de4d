import { CdkDrag, CdkDragDrop, CdkDragPlaceholder, CdkDropList } from '@angular/cdk/drag-drop';
import { DatePipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  computed,
  effect,
  inject,
  input,
  signal,
  untracked,
  viewChild,
  viewChildren,
} from '@angular/core';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatDivider } from '@angular/material/divider';
import { MatIcon } from '@angular/material/icon';
import { MatMenu, MatMenuItem, MatMenuTrigger } from '@angular/material/menu';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatTooltip } from '@angular/material/tooltip';
import { Router, RouterLink } from '@angular/router';
import type { StepKind } from '@shared/format/worksheet';
import { firstValueFrom } from 'rxjs';
import { toApiError } from '../../core/api-error';
import { roleLabel } from '../../core/roles';
import { CautionNotice } from '../results/caution-notice';
import { STEP_KIND_GROUPS, STEP_KIND_INFO, stepKindInfo } from '../results/step-kinds';
import { WorksheetApi } from '../worksheet-api';
import { ConfirmDialog, ConfirmDialogData } from './confirm-dialog';
import { ConflictChoice, ConflictDialog, ConflictDialogData } from './conflict-dialog';
import { SaveDialog, SaveDialogData, SaveDialogResult } from './save-dialog';
import { StepCard } from './step-card';
import { HoldsUnsavedWork } from './unsaved-work-guard';
import { WorksheetDraft } from './worksheet-draft';

/** Keyboard shortcuts of the editor, as shown in its shortcut list. */
export const EDITOR_SHORTCUTS = [
  { keys: 'Ctrl/⌘ + S', does: 'Save a new revision' },
  { keys: 'Alt + N', does: 'Add a step' },
  { keys: 'Alt + J  or  Alt + Page Down', does: 'Go to the next step' },
  { keys: 'Alt + K  or  Alt + Page Up', does: 'Go to the previous step' },
] as const;

/**
 * The worksheet editor: the ordered steps as cards (settings and findings), the add-step menu,
 * drag-and-drop reordering, live preview of unsaved edits, saving with a message (and what to do
 * when someone saved first), and the keyboard shortcuts.
 */
@Component({
  selector: 'sp-worksheet-editor',
  imports: [
    CdkDropList,
    CdkDrag,
    CdkDragPlaceholder,
    MatButton,
    MatIconButton,
    MatIcon,
    MatMenu,
    MatMenuItem,
    MatMenuTrigger,
    MatDivider,
    MatProgressBar,
    MatTooltip,
    RouterLink,
    DatePipe,
    StepCard,
    CautionNotice,
  ],
  providers: [WorksheetDraft],
  templateUrl: './worksheet-editor.html',
  styleUrl: './worksheet-editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: {
    '(document:keydown)': 'keydown($event)',
    '(window:beforeunload)': 'beforeUnload($event)',
  },
})
export class WorksheetEditor implements HoldsUnsavedWork {
  /** From the route `worksheets/:worksheetId`. */
  readonly worksheetId = input.required<string>();

  protected readonly draft = inject(WorksheetDraft);
  private readonly dialog = inject(MatDialog);
  private readonly router = inject(Router);
  private readonly api = inject(WorksheetApi);
  private readonly cards = viewChildren(StepCard);
  private readonly addTrigger = viewChild<MatMenuTrigger>('addTrigger');

  protected readonly kinds = STEP_KIND_INFO;
  protected readonly kindGroups = STEP_KIND_GROUPS;
  protected readonly shortcuts = EDITOR_SHORTCUTS;
  protected readonly roleLabel = roleLabel;
  protected readonly exportUrl = computed(() => {
    const base = this.draft.base();
    const worksheet = this.draft.worksheet();
    return worksheet && base ? WorksheetApi.exportUrl(worksheet.id, base.id) : null;
  });

  protected readonly steps = computed(() => this.draft.document()?.steps ?? []);
  protected readonly stepEntries = computed(() =>
    this.steps().map((step, index) => {
      const result = this.draft.resultOf(step.id);
      return {
        step,
        index,
        label: this.draft.titles()[step.id] ?? `${index + 1}`,
        icon: stepKindInfo(step.kind).icon,
        status: !result ? 'none' : result.status === 'error' ? 'error' : result.assumptions.some((a) => a.id === 'normality' && a.status === 'rejected') ? 'flag' : 'ok',
      };
    }),
  );
  /** Where the add-step menu inserts (null: at the end). */
  private readonly insertAt = signal<number | null>(null);
  protected readonly saving = signal(false);
  protected readonly notice = signal<string | null>(null);
  protected readonly actionError = signal<string | null>(null);
  private leaving = false;

  constructor() {
    effect(() => {
      const id = this.worksheetId();
      untracked(() => void this.draft.load(id));
    });
    const destroyRef = inject(DestroyRef);
    let timer: ReturnType<typeof setTimeout> | undefined;
    // Notices ("Saved as revision 4") fade after a while.
    effect(() => {
      if (this.notice() === null) return;
      clearTimeout(timer);
      timer = setTimeout(() => this.notice.set(null), 10_000);
    });
    destroyRef.onDestroy(() => clearTimeout(timer));
  }

  // -------------------------------------------------------------------------------------------
  // Steps
  // -------------------------------------------------------------------------------------------

  protected addStep(kind: StepKind): void {
    const at = this.insertAt();
    this.insertAt.set(null);
    const id = this.draft.addStep(kind, at ?? undefined);
    if (id) this.focusStep(id);
  }

  protected openAddMenu(at: number | null): void {
    this.insertAt.set(at);
    this.addTrigger()?.openMenu();
  }

  protected addMenuClosed(): void {
    // The menu keeps its insertion point until a kind is chosen; closing without one resets it.
    setTimeout(() => this.insertAt.set(null));
  }

  protected dropped(event: CdkDragDrop<unknown>): void {
    if (event.previousIndex === event.currentIndex) return;
    const step = this.steps()[event.previousIndex];
    this.draft.moveStep(event.previousIndex, event.currentIndex);
    if (step) this.focusStep(step.id);
  }

  /** Focuses a step's heading once it is rendered (a new step needs one change detection first). */
  protected focusStep(stepId: string): void {
    setTimeout(() => this.cards().find((card) => card.step().id === stepId)?.focus());
  }

  private moveFocus(delta: number): void {
    const steps = this.steps();
    if (steps.length === 0) return;
    const active = document.activeElement?.closest('[data-step-id]')?.getAttribute('data-step-id');
    const current = steps.findIndex((s) => s.id === active);
    const next = current < 0 ? (delta > 0 ? 0 : steps.length - 1) : Math.max(0, Math.min(steps.length - 1, current + delta));
    this.focusStep(steps[next]!.id);
  }

  // -------------------------------------------------------------------------------------------
  // Title, save, fork, discard
  // -------------------------------------------------------------------------------------------

  protected setTitle(text: string): void {
    const title = text.trim().slice(0, 200);
    if (title === '' || title === this.draft.document()?.title) return;
    this.draft.setTitle(title);
  }

  protected async save(): Promise<void> {
    const base = this.draft.base();
    if (!base || !this.draft.canEdit() || this.saving() || this.dialog.openDialogs.length > 0) return;
    this.saving.set(true);
    this.actionError.set(null);
    try {
      const data: SaveDialogData = { draft: this.draft, baseNumber: base.number };
      const result = await firstValueFrom(
        this.dialog.open<SaveDialog, SaveDialogData, SaveDialogResult>(SaveDialog, { data, autoFocus: 'first-tabbable' }).afterClosed(),
      );
      if (result && 'saved' in result) {
        this.notice.set(`Saved as revision ${result.saved.number}.`);
      } else if (result && 'conflict' in result) {
        await this.resolveConflict(result.conflict.details.head, base.id, base.number);
      }
    } finally {
      this.saving.set(false);
    }
  }

  private async resolveConflict(head: ConflictDialogData['head'], baseRevisionId: string, baseNumber: number): Promise<void> {
    const choice = await firstValueFrom(
      this.dialog
        .open<ConflictDialog, ConflictDialogData, ConflictChoice>(ConflictDialog, { data: { head, baseRevisionId, baseNumber }, width: '560px', maxWidth: '95vw' })
        .afterClosed(),
    );
    if (choice === 'reload') {
      await this.draft.reloadLatest();
      this.notice.set(`Loaded revision ${head.number}; your edit was dropped.`);
    } else if (choice === 'fork') {
      await this.forkDraft(`Edit of revision ${baseNumber} kept as a fork (revision ${head.number} was saved first)`);
    }
  }

  protected async forkDraft(message = 'Forked from the editor'): Promise<void> {
    this.actionError.set(null);
    try {
      const worksheet = await this.draft.fork({ message });
      this.leaving = true;
      await this.router.navigate(['/worksheets', worksheet.id]);
    } catch (error) {
      this.actionError.set(toApiError(error).message);
    } finally {
      this.leaving = false;
    }
  }

  protected async discard(): Promise<void> {
    const confirmed = await this.ask({
      title: 'Discard the unsaved edit?',
      message: `The draft goes back to revision ${this.draft.base()?.number ?? ''}. This cannot be undone.`,
      confirm: 'Discard edit',
      destructive: true,
    });
    if (confirmed) this.draft.discardDraft();
  }

  protected async archive(): Promise<void> {
    const worksheet = this.draft.worksheet();
    if (!worksheet) return;
    const confirmed = await this.ask({
      title: `Archive “${worksheet.title}”?`,
      message: 'An archived worksheet is read-only and leaves the list; owners can restore it from the team page.',
      confirm: 'Archive',
    });
    if (!confirmed) return;
    try {
      this.draft.worksheet.set(await this.api.archive(worksheet.id));
    } catch (error) {
      this.actionError.set(toApiError(error).message);
    }
  }

  private ask(data: ConfirmDialogData): Promise<boolean | undefined> {
    return firstValueFrom(this.dialog.open<ConfirmDialog, ConfirmDialogData, boolean>(ConfirmDialog, { data }).afterClosed());
  }

  // -------------------------------------------------------------------------------------------
  // Leaving, keyboard
  // -------------------------------------------------------------------------------------------

  async confirmLeave(): Promise<boolean> {
    if (this.leaving || !this.draft.dirty() || !this.draft.canEdit()) return true;
    const confirmed = await this.ask({
      title: 'Leave with unsaved edits?',
      message: 'Your edit is kept in this browser and comes back when you open the worksheet again, but it is not saved as a revision.',
      confirm: 'Leave',
      cancel: 'Stay',
    });
    return confirmed === true;
  }

  protected beforeUnload(event: BeforeUnloadEvent): void {
    if (this.draft.dirty() && this.draft.canEdit()) event.preventDefault();
  }

  protected keydown(event: KeyboardEvent): void {
    if ((event.ctrlKey || event.metaKey) && !event.altKey && event.code === 'KeyS') {
      event.preventDefault();
      void this.save();
      return;
    }
    if (!event.altKey || event.ctrlKey || event.metaKey || this.dialog.openDialogs.length > 0) return;
    const inCodeEditor = !!(event.target as Element | null)?.closest?.('.monaco-editor');
    if (event.code === 'KeyN' && !event.shiftKey && this.draft.canEdit()) {
      event.preventDefault();
      this.openAddMenu(null);
    } else if ((event.code === 'KeyJ' || event.key === 'PageDown') && !inCodeEditor) {
      event.preventDefault();
      this.moveFocus(1);
    } else if ((event.code === 'KeyK' || event.key === 'PageUp') && !inCodeEditor) {
      event.preventDefault();
      this.moveFocus(-1);
    }
  }
}
