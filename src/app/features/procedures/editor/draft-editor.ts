import { ChangeDetectionStrategy, Component, computed, DestroyRef, inject, input, output, signal, untracked } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatExpansionModule } from '@angular/material/expansion';
import { MAT_FORM_FIELD_DEFAULT_OPTIONS, MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { map, startWith, switchMap } from 'rxjs';
import type { ProcedureVersionDetail } from '@setwright/contracts/procedures';
import type { Procedure } from '@setwright/procedures/schema';
import { toProblem } from '../../../core/problem';
import { ProcedureApi } from '../procedure-api';
import { STEP_KIND_LABELS } from '../procedure-words';
import { CautionEditor } from './caution-editor';
import {
  checkDraft,
  freshId,
  hasProblems,
  moveItem,
  problemOf,
  procedureForm,
  showProblems,
  stepForm,
  type FieldProblem,
  type StepForm,
} from './draft-form';
import { StepEditor } from './step-editor';

/**
 * The draft editor: the whole procedure as a form, checked live with the same schema and
 * reference checks the server runs, saved as one body. Server problems land on the field their
 * pointer names.
 */
@Component({
  selector: 'sw-draft-editor',
  imports: [
    ReactiveFormsModule,
    MatButtonModule,
    MatExpansionModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    CautionEditor,
    StepEditor,
  ],
  templateUrl: './draft-editor.html',
  styleUrl: './editor.scss',
  // Hints and problems take the room they need, so long ones never run into the next field.
  providers: [{ provide: MAT_FORM_FIELD_DEFAULT_OPTIONS, useValue: { appearance: 'outline', subscriptSizing: 'dynamic' } }],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DraftEditor {
  private readonly api = inject(ProcedureApi);

  readonly draft = input.required<ProcedureVersionDetail>();
  /** The draft as saved by the server. */
  readonly saved = output<ProcedureVersionDetail>();
  /** The procedure as it stands in the form, whenever it passes every check (null while it does not). */
  readonly changed = output<Procedure | null>();
  /** True while the form holds changes that are not saved. */
  readonly unsaved = output<boolean>();

  private readonly draftId = computed(() => `${this.draft().key}@${this.draft().version}`);
  /** Built once per draft, so saving does not throw away what is open on screen. */
  protected readonly form = computed(() => {
    this.draftId();
    return procedureForm(untracked(this.draft).body);
  });
  protected readonly c = computed(() => this.form().controls);

  /** Bumped whenever problems are shown, so every part of the editor looks again. */
  protected readonly revision = signal(0);
  protected readonly unplaced = signal<FieldProblem[]>([]);
  protected readonly problemCount = signal(0);
  protected readonly message = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly dirty = signal(false);
  private readonly open = signal(new Set<StepForm>());

  protected readonly problem = problemOf;
  protected readonly hasProblems = hasProblems;
  protected readonly kindLabel = (k: keyof typeof STEP_KIND_LABELS) => STEP_KIND_LABELS[k];

  constructor() {
    toObservable(this.form)
      .pipe(
        switchMap((f) => f.valueChanges.pipe(startWith(null), map(() => f))),
        takeUntilDestroyed(inject(DestroyRef)),
      )
      .subscribe((f) => this.check(f.dirty));
  }

  protected isOpen(step: StepForm) {
    return this.open().has(step);
  }
  protected setOpen(step: StepForm, open: boolean) {
    this.open.update((s) => {
      const next = new Set(s);
      if (open) next.add(step);
      else next.delete(step);
      return next;
    });
  }

  protected addHazard() {
    this.c().hazards.push(new FormControl('', { nonNullable: true }));
  }
  protected removeHazard(i: number) {
    this.c().hazards.removeAt(i);
  }

  protected addStep() {
    const steps = this.c().steps;
    const step = stepForm(undefined, freshId('step', steps.controls.map((s) => s.controls.id.value)));
    steps.push(step);
    this.setOpen(step, true);
  }
  protected removeStep(i: number) {
    const step = this.c().steps.at(i);
    this.c().steps.removeAt(i);
    this.setOpen(step, false);
  }
  protected moveStep(i: number, by: -1 | 1) {
    moveItem(this.c().steps, i, by);
  }

  /** Run the live check, show what it finds, and tell the page whether the draft is sound. */
  private check(dirty: boolean) {
    const form = this.form();
    const { procedure, problems } = checkDraft(form);
    this.unplaced.set(showProblems(form, problems, 'check'));
    this.problemCount.set(problems.length);
    this.dirty.set(dirty);
    this.revision.update((n) => n + 1);
    this.changed.emit(procedure);
    this.unsaved.emit(dirty);
  }

  /** Open every step with something to correct. */
  private openProblemSteps() {
    const withProblems = this.c().steps.controls.filter((s) => hasProblems(s));
    this.open.update((s) => new Set([...s, ...withProblems]));
  }

  protected async save() {
    const form = this.form();
    this.message.set(null);
    const { procedure, problems } = checkDraft(form);
    if (!procedure) {
      this.unplaced.set(showProblems(form, problems, 'check'));
      form.markAllAsTouched();
      this.openProblemSteps();
      this.revision.update((n) => n + 1);
      this.message.set(`${problems.length === 1 ? 'One thing needs' : `${problems.length} things need`} correcting before the draft can be saved. Each is marked below.`);
      return;
    }
    this.busy.set(true);
    try {
      const saved = await this.api.save(this.draft().key, this.draft().version, procedure);
      showProblems(form, [], 'server');
      form.markAsPristine();
      this.dirty.set(false);
      this.unsaved.emit(false);
      this.message.set('Saved.');
      this.saved.emit(saved);
    } catch (err) {
      const problem = toProblem(err);
      const unplaced = showProblems(form, problem.errors ?? [], 'server');
      this.unplaced.set([...unplaced, ...this.unplaced()]);
      this.openProblemSteps();
      this.message.set(problem.detail ?? problem.title);
    } finally {
      this.busy.set(false);
      this.revision.update((n) => n + 1);
    }
  }
}
