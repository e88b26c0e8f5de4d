import { CdkDragHandle } from '@angular/cdk/drag-drop';
import { ChangeDetectionStrategy, Component, ElementRef, computed, inject, input, output, signal, viewChild } from '@angular/core';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatDivider } from '@angular/material/divider';
import { MatMenu, MatMenuItem, MatMenuTrigger } from '@angular/material/menu';
import { MatTooltip } from '@angular/material/tooltip';
import type { Source, Step, StepKind, StepOfKind } from '@shared/format/worksheet';
import { firstValueFrom } from 'rxjs';
import { DataStepEditor } from '../data/data-step-editor';
import { StepFindings } from '../results/step-findings';
import { CONFIDENCE_KINDS, SOURCE_KINDS, stepKindInfo } from '../results/step-kinds';
import { describeStep, stepLabel } from '../results/step-summary';
import { ConfidenceWhatIf } from './confidence-what-if';
import { ConfirmDialog, ConfirmDialogData } from './confirm-dialog';
import { DerivedColumnEditor } from './derived-column-editor';
import { clone, createStep, groupColumnOf, setGroupColumn, stepsReadingFrom, withConfidence } from './draft-document';
import { NoteEditor } from './note-editor';
import { ParamFieldsForm } from './param-fields-form';
import { SourceFields } from './source-fields';
import { WorksheetDraft } from './worksheet-draft';

/** What the card offers when a normality check has found evidence against normality. */
interface RobustOffer {
  readonly label: string;
  readonly explain: string;
  readonly apply: () => void;
}

/**
 * One step of the worksheet being edited: its heading and actions (drag to reorder, duplicate,
 * move, delete), its settings, and its findings — live from the draft preview, or the saved
 * result. A step whose method relies on normality is flagged when a normality check rejects it,
 * with the robust alternative one click away.
 */
@Component({
  selector: 'sp-step-card',
  imports: [
    CdkDragHandle,
    MatButton,
    MatIconButton,
    MatIcon,
    MatMenu,
    MatMenuItem,
    MatMenuTrigger,
    MatDivider,
    MatTooltip,
    MatFormField,
    MatLabel,
    MatInput,
    StepFindings,
    ParamFieldsForm,
    SourceFields,
    DataStepEditor,
    DerivedColumnEditor,
    NoteEditor,
    ConfidenceWhatIf,
  ],
  templateUrl: './step-card.html',
  styleUrl: './step-card.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class StepCard {
  readonly step = input.required<Step>();
  readonly index = input.required<number>();
  readonly count = input.required<number>();
  /** Asks the editor to open the add-step menu for a step right below this one. */
  readonly addBelow = output<number>();
  /** Asks the editor to move the keyboard focus to another step (after a move or a delete). */
  readonly focusStep = output<string>();

  protected readonly draft = inject(WorksheetDraft);
  private readonly dialog = inject(MatDialog);
  private readonly heading = viewChild.required<ElementRef<HTMLElement>>('heading');

  protected readonly titles = this.draft.titles;
  protected readonly info = computed(() => stepKindInfo(this.step().kind));
  protected readonly label = computed(() => stepLabel(this.step(), this.info().label));
  protected readonly result = computed(() => this.draft.resultOf(this.step().id));
  protected readonly engineError = computed(() => {
    const error = this.result()?.error;
    return error ? { field: error.field, message: error.message } : null;
  });
  /** Steps not in the saved revision yet, and steps with an error, show their settings; others a summary. */
  private readonly isNew = computed(() => !(this.draft.base()?.document.steps.some((s) => s.id === this.step().id) ?? false));
  private readonly userOpen = signal<boolean | null>(null);
  protected readonly settingsOpen = computed(() => this.userOpen() ?? (this.isNew() || this.result()?.status === 'error'));
  protected readonly summary = computed(() => describeStep(this.step(), this.titles()));
  protected readonly whatIfActive = signal(false);
  protected readonly canEdit = this.draft.canEdit;
  protected readonly hasSource = computed(() => SOURCE_KINDS.has(this.step().kind));
  protected readonly hasConfidence = computed(() => CONFIDENCE_KINDS.has(this.step().kind));
  protected readonly dataSteps = computed(() => this.draft.dataStepsBefore(this.index()));
  protected readonly unit = computed(() => {
    const step = this.step();
    if (!('source' in step.params)) return undefined;
    const source = step.params.source as Source;
    if ('summary' in source) return source.unit;
    const data = this.dataSteps().find((d) => d.id === source.step);
    return data?.columns.find((c) => c.name === source.column)?.unit;
  });

  /** The state of the result shown: saved, an unsaved preview, or a preview of an older draft. */
  protected readonly resultState = computed<'saved' | 'preview' | 'updating' | 'none'>(() => {
    if (!this.result()) return 'none';
    if (!this.draft.dirty()) return 'saved';
    return this.draft.resultsCurrent() ? 'preview' : 'updating';
  });

  protected readonly normalityRejected = computed(
    () => this.result()?.assumptions.some((a) => a.id === 'normality' && a.status === 'rejected') ?? false,
  );

  /** For a normality check: the steps whose normality assumption it checked. */
  protected readonly reliantSteps = computed(() => {
    if (this.step().kind !== 'normality-check') return [];
    const id = this.step().id;
    return (this.draft.results()?.steps ?? [])
      .filter((r) => r.assumptions.some((a) => a.id === 'normality' && a.checkedBy === id))
      .map((r) => ({ id: r.stepId, title: this.titles()[r.stepId] ?? r.title, rejected: r.assumptions.some((a) => a.id === 'normality' && a.status === 'rejected') }));
  });

  protected readonly reliantRejected = computed(() => this.reliantSteps().some((s) => s.rejected));

  protected readonly robustOffer = computed<RobustOffer | null>(() => {
    if (!this.normalityRejected() || !this.canEdit()) return null;
    const step = this.step();
    switch (step.kind) {
      case 'sigma-interval':
        if (step.params.methods.length === 1 && step.params.methods[0] === 'bonett') return null;
        return {
          label: "Use Bonett's robust interval only",
          explain: 'Bonett (2006) does not assume normality; it needs the individual values.',
          apply: () => this.update({ ...step, params: { ...step.params, methods: ['bonett'] } }),
        };
      case 'target-test':
        return {
          label: 'Add a robust Bonett interval below',
          explain: 'The chi-square test relies on normality; a Bonett bound on the same measurements does not.',
          apply: () => this.addRobustInterval(step),
        };
      case 'two-sample-ratio':
        return {
          label: 'Add Levene and Brown-Forsythe tests below',
          explain: 'The F test relies on normality; Levene and Brown-Forsythe compare spreads robustly.',
          apply: () => this.addGroupComparison(step),
        };
      default:
        return null;
    }
  });

  protected readonly groupColumn = computed(() => {
    const document = this.draft.document();
    return document ? groupColumnOf(document, this.step().id) : null;
  });

  protected asKind<K extends StepKind>(_kind: K): StepOfKind<K> {
    return this.step() as StepOfKind<K>;
  }

  protected asSourceStep(): Extract<Step, { params: { source: Source } }> {
    return this.step() as Extract<Step, { params: { source: Source } }>;
  }

  /** Moves the keyboard focus to this card's heading and scrolls it into view. */
  focus(): void {
    const element = this.heading().nativeElement;
    element.focus({ preventScroll: true });
    element.scrollIntoView({ block: 'start', behavior: 'smooth' });
  }

  protected toggleSettings(): void {
    this.userOpen.set(!this.settingsOpen());
  }

  protected update(step: Step): void {
    this.draft.updateStep(step);
  }

  protected setTitle(text: string): void {
    const step = this.step();
    const title = text.trim().slice(0, 200);
    if ((step.title ?? '') === title) return;
    const { title: _old, ...rest } = step;
    this.update((title ? { ...rest, title } : rest) as Step);
  }

  protected setGroupColumn(column: string | null): void {
    const document = this.draft.document();
    if (document) this.draft.replaceDocument(setGroupColumn(document, this.step().id, column));
  }

  protected applyLevel(level: number): void {
    const changed = withConfidence(this.step(), level);
    if (changed) this.update(changed);
  }

  protected duplicate(): void {
    const id = this.draft.duplicateStep(this.step().id);
    if (id) this.focusStep.emit(id);
  }

  protected move(delta: number): void {
    const index = this.index();
    this.draft.moveStep(index, index + delta);
    this.focusStep.emit(this.step().id);
  }

  protected async remove(): Promise<void> {
    const document = this.draft.document();
    if (!document) return;
    const readers = stepsReadingFrom(document, this.step().id);
    const data: ConfirmDialogData = {
      title: `Delete “${this.label()}”?`,
      message:
        readers.length > 0
          ? `${readers.length} step${readers.length === 1 ? ' reads' : 's read'} from this one (${readers.map((id) => this.titles()[id] ?? id).join(', ')}) and will show an error until you choose other data. The step stays in earlier revisions.`
          : 'The step stays in earlier revisions; this only changes the draft.',
      confirm: 'Delete step',
      destructive: true,
    };
    const confirmed = await firstValueFrom(this.dialog.open(ConfirmDialog, { data, autoFocus: 'dialog' }).afterClosed());
    if (!confirmed) return;
    const next = document.steps[this.index() + 1] ?? document.steps[this.index() - 1];
    this.draft.removeStep(this.step().id);
    if (next) this.focusStep.emit(next.id);
  }

  private addRobustInterval(step: StepOfKind<'target-test'>): void {
    const document = this.draft.document();
    if (!document) return;
    const interval = createStep('sigma-interval', document, this.dataSteps()) as StepOfKind<'sigma-interval'>;
    interval.params = {
      source: clone(step.params.source),
      levels: [Number((1 - step.params.alpha).toPrecision(12))],
      sides: step.params.alternative === 'greater' ? 'lower' : step.params.alternative === 'less' ? 'upper' : 'two-sided',
      methods: ['bonett'],
    };
    interval.title = `Robust interval for ${this.label()}`.slice(0, 200);
    this.draft.insertStep(interval, this.index() + 1);
    this.focusStep.emit(interval.id);
  }

  private addGroupComparison(step: StepOfKind<'two-sample-ratio'>): void {
    const document = this.draft.document();
    if (!document) return;
    const comparison = createStep('group-comparison', document, this.dataSteps()) as StepOfKind<'group-comparison'>;
    comparison.params = { source: clone(step.params.source), alpha: step.params.alpha };
    comparison.title = `Robust comparison for ${this.label()}`.slice(0, 200);
    this.draft.insertStep(comparison, this.index() + 1);
    this.focusStep.emit(comparison.id);
  }
}
