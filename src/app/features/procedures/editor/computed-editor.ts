import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { isMathsFunctionName, mathsFunctions } from '@setwright/maths';
import { problemOf, type ComputedForm } from './draft-form';
import { LimitsEditor } from './limits-editor';

const FUNCTIONS = Object.entries(mathsFunctions)
  .map(([name, f]) => ({ name, summary: f.summary, inputs: f.inputs, outputs: f.outputs }))
  .sort((a, b) => a.name.localeCompare(b.name));

/** One value worked out from the step's readings by a function of the workshop maths. */
@Component({
  selector: 'sw-computed-editor',
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatSelectModule, LimitsEditor],
  template: `
    @let c = field().controls;
    <div class="grid">
      <mat-form-field appearance="outline">
        <mat-label>What it is called</mat-label>
        <input matInput [formControl]="c.label" />
        <mat-error>{{ problem(c.label) }}</mat-error>
      </mat-form-field>
      <mat-form-field appearance="outline">
        <mat-label>Value id</mat-label>
        <input matInput [formControl]="c.id" autocomplete="off" spellcheck="false" />
        <mat-error>{{ problem(c.id) }}</mat-error>
      </mat-form-field>
      <mat-form-field appearance="outline">
        <mat-label>Maths function</mat-label>
        <mat-select [formControl]="c.fn">
          @if (c.fn.value && !known(c.fn.value)) {
            <mat-option [value]="c.fn.value">{{ c.fn.value }} (not in the workshop maths)</mat-option>
          }
          @for (f of functions; track f.name) {
            <mat-option [value]="f.name">{{ f.name }} · {{ f.summary }}</mat-option>
          }
        </mat-select>
        <mat-error>{{ problem(c.fn) }}</mat-error>
      </mat-form-field>
    </div>
    @if (about(c.fn.value); as f) {
      <p class="hint">Takes {{ f.inputs }}. Gives {{ f.outputs }}.</p>
    }
    <mat-form-field appearance="outline" class="wide">
      <mat-label>Arguments (JSON)</mat-label>
      <textarea matInput class="code" [formControl]="c.args" rows="5" spellcheck="false"></textarea>
      <mat-hint>{{ '{' }} "$input": "field id" {{ '}' }} for a field of this step, {{ '{' }} "$spec": "path", "unit": "mm" {{ '}' }} for a machine figure, {{ '{' }} "$q": 100, "unit": "mm" {{ '}' }} for a fixed quantity</mat-hint>
      <mat-error>{{ problem(c.args) }}</mat-error>
    </mat-form-field>
    <div class="grid">
      <mat-form-field appearance="outline">
        <mat-label>Part of the result</mat-label>
        <input matInput [formControl]="c.output" autocomplete="off" spellcheck="false" />
        <mat-hint>e.g. stress; empty for the whole result</mat-hint>
        <mat-error>{{ problem(c.output) }}</mat-error>
      </mat-form-field>
      <mat-form-field appearance="outline">
        <mat-label>Unit shown (optional)</mat-label>
        <input matInput [formControl]="c.unit" autocomplete="off" />
        <mat-error>{{ problem(c.unit) }}</mat-error>
      </mat-form-field>
      <mat-form-field appearance="outline">
        <mat-label>Decimal places shown</mat-label>
        <input matInput type="number" inputmode="numeric" min="0" max="4" [formControl]="c.decimals" />
        <mat-error>{{ problem(c.decimals) }}</mat-error>
      </mat-form-field>
    </div>
    <sw-limits-editor [limits]="c.limits" [unit]="c.unit.value" legend="Acceptance limits (for a number)" [revision]="revision()" />
    <div class="grid">
      <mat-form-field appearance="outline">
        <mat-label>Worded results that pass</mat-label>
        <input matInput [formControl]="c.acceptable" autocomplete="off" />
        <mat-hint>For a result in words; separated by commas, e.g. within</mat-hint>
        <mat-error>{{ problem(c.acceptable) }}</mat-error>
      </mat-form-field>
      <mat-form-field appearance="outline">
        <mat-label>Worded results that warn</mat-label>
        <input matInput [formControl]="c.advisory" autocomplete="off" />
        <mat-hint>They pass, with a warning on screen and in the record</mat-hint>
        <mat-error>{{ problem(c.advisory) }}</mat-error>
      </mat-form-field>
      <mat-form-field appearance="outline">
        <mat-label>Work out only when filled</mat-label>
        <input matInput [formControl]="c.when" autocomplete="off" spellcheck="false" />
        <mat-hint>Field ids separated by commas; empty for every field it uses</mat-hint>
        <mat-error>{{ problem(c.when) }}</mat-error>
      </mat-form-field>
    </div>
    <mat-form-field appearance="outline" class="wide">
      <mat-label>Help for the trainee (optional)</mat-label>
      <textarea matInput [formControl]="c.help" rows="2"></textarea>
      <mat-error>{{ problem(c.help) }}</mat-error>
    </mat-form-field>
    @if (problem(field()); as p) {
      <p class="problem" role="alert">{{ p }}</p>
    }
  `,
  styleUrl: './editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ComputedEditor {
  readonly field = input.required<ComputedForm>();
  readonly revision = input(0);

  protected readonly functions = FUNCTIONS;
  protected readonly problem = problemOf;
  protected readonly known = isMathsFunctionName;
  protected about(name: string) {
    return FUNCTIONS.find((f) => f.name === name) ?? null;
  }
}
