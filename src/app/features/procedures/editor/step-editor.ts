import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { toObservable, toSignal } from '@angular/core/rxjs-interop';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { map, startWith, switchMap } from 'rxjs';
import { STEP_KINDS } from '@setwright/procedures/schema';
import { STEP_KIND_LABELS } from '../procedure-words';
import { CautionEditor } from './caution-editor';
import { ComputedEditor } from './computed-editor';
import { computedForm, freshId, inputForm, moveItem, problemOf, type StepForm } from './draft-form';
import { InputEditor } from './input-editor';

/** One step of a draft: what it is, its cautions, what the trainee fills in, and what is worked out. */
@Component({
  selector: 'sw-step-editor',
  imports: [
    ReactiveFormsModule,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    MatSlideToggleModule,
    CautionEditor,
    InputEditor,
    ComputedEditor,
  ],
  templateUrl: './step-editor.html',
  styleUrl: './editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class StepEditor {
  readonly step = input.required<StepForm>();
  readonly revision = input(0);

  protected readonly kinds = STEP_KINDS.map((value) => ({ value, label: STEP_KIND_LABELS[value] }));
  protected readonly problem = problemOf;

  private readonly value = toSignal(
    toObservable(this.step).pipe(switchMap((s) => s.valueChanges.pipe(startWith(null), map(() => s.getRawValue())))),
  );
  /** The step's fields, for "needed only when" and the headings. */
  protected readonly fields = computed(() => (this.value()?.inputs ?? []).map((i) => ({ id: i.id, label: i.label })));

  protected addInput() {
    const inputs = this.step().controls.inputs;
    inputs.push(inputForm(undefined, freshId('field', inputs.controls.map((c) => c.controls.id.value))));
  }
  protected removeInput(i: number) {
    this.step().controls.inputs.removeAt(i);
  }
  protected moveInput(i: number, by: -1 | 1) {
    moveItem(this.step().controls.inputs, i, by);
  }
  protected addComputed() {
    const list = this.step().controls.computed;
    list.push(computedForm(undefined, freshId('value', list.controls.map((c) => c.controls.id.value))));
  }
  protected removeComputed(i: number) {
    this.step().controls.computed.removeAt(i);
  }
  protected moveComputed(i: number, by: -1 | 1) {
    moveItem(this.step().controls.computed, i, by);
  }
}
