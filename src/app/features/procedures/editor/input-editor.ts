import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { INPUT_TYPE_LABELS } from '../procedure-words';
import { optionForm, problemOf, type InputForm, type InputType } from './draft-form';
import { LimitsEditor } from './limits-editor';

/** One field the trainee fills in: what it asks, its type, and what counts as a pass. */
@Component({
  selector: 'sw-input-editor',
  imports: [
    ReactiveFormsModule,
    MatButtonModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    MatSlideToggleModule,
    LimitsEditor,
  ],
  templateUrl: './input-editor.html',
  styleUrl: './editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class InputEditor {
  readonly field = input.required<InputForm>();
  /** The step's fields (this one is left out of the list), for "needed only when". */
  readonly siblings = input<{ id: string; label: string }[]>([]);
  readonly revision = input(0);

  protected readonly types = (Object.keys(INPUT_TYPE_LABELS) as InputType[]).map((value) => ({ value, label: INPUT_TYPE_LABELS[value] }));
  protected readonly problem = problemOf;

  protected addOption() {
    this.field().controls.options.push(optionForm());
  }
  protected removeOption(i: number) {
    this.field().controls.options.removeAt(i);
  }
}
