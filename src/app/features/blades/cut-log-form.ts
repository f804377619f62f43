import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { FormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { CUT_SHAPE_LABELS, CUT_SHAPES, cutLogSchema, type CutLogView, type CutShape } from '@setwright/contracts/blades';
import { totalCutArea, type CutSection } from '@setwright/maths';
import { applyProblemToForm, toProblem, type Problem } from '../../core/problem';
import { UnitChoice } from '../workshop-maths/unit-choice';
import { areaFromM2, areaText } from './area';
import { BladeApi, type CutLogBody } from './blade-api';

type Size = 'diameter' | 'width' | 'height' | 'outside' | 'wall';
const SIZES: Record<CutShape, { id: Size; label: string }[]> = {
  round: [{ id: 'diameter', label: 'Diameter' }],
  rectangle: [
    { id: 'width', label: 'Width' },
    { id: 'height', label: 'Height' },
  ],
  tube: [
    { id: 'outside', label: 'Outside diameter' },
    { id: 'wall', label: 'Wall thickness' },
  ],
};

/** Log cuts made with the blade on the saw: the section, its size and how many; the area it adds shows as you type. */
@Component({
  selector: 'sw-cut-log-form',
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatButtonModule],
  template: `
    <form [formGroup]="form" (ngSubmit)="save()" novalidate aria-label="Log cuts">
      <div class="fields">
        <mat-form-field appearance="outline">
          <mat-label>Section</mat-label>
          <mat-select formControlName="shape">
            @for (s of shapes; track s) {
              <mat-option [value]="s">{{ shapeLabels[s] }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
        @for (f of sizes(); track f.id) {
          <mat-form-field appearance="outline">
            <mat-label>{{ f.label }}</mat-label>
            <input matInput [formControlName]="f.id" inputmode="decimal" required />
            <span matTextSuffix>{{ unit() }}</span>
            <mat-error>{{ form.controls[f.id].errors?.['server'] }}</mat-error>
          </mat-form-field>
        }
        <mat-form-field appearance="outline">
          <mat-label>Number of cuts</mat-label>
          <input matInput formControlName="count" inputmode="numeric" required />
          <mat-error>{{ form.controls.count.errors?.['server'] }}</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline" class="note">
          <mat-label>Note (optional)</mat-label>
          <input matInput formControlName="note" maxlength="200" />
          <mat-error>{{ form.controls.note.errors?.['server'] }}</mat-error>
        </mat-form-field>
      </div>
      <div class="actions">
        <span class="adds" aria-live="polite">
          @if (adds(); as a) {
            Adds {{ a }} of cut area
          }
        </span>
        <button mat-flat-button type="submit" [disabled]="saving()">Log cuts</button>
      </div>
      @for (line of problems(); track line) {
        <p class="problem" role="alert">{{ line }}</p>
      }
    </form>
  `,
  styles: `
    .fields {
      display: grid;
      grid-template-columns: repeat(auto-fit, minmax(170px, 1fr));
      gap: 0 12px;
    }
    .actions {
      display: flex;
      align-items: center;
      justify-content: flex-end;
      gap: 16px;
      flex-wrap: wrap;
    }
    .adds {
      color: var(--mat-sys-on-surface-variant);
    }
    .problem {
      color: var(--mat-sys-error);
      font-weight: 500;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CutLogForm {
  private readonly api = inject(BladeApi);
  private readonly units = inject(UnitChoice);
  readonly fittingId = input.required<string>();
  readonly logged = output<CutLogView>();

  protected readonly shapes = CUT_SHAPES;
  protected readonly shapeLabels = CUT_SHAPE_LABELS;
  protected readonly unit = computed(() => (this.units.system() === 'imperial' ? 'in' : 'mm'));
  protected readonly saving = signal(false);
  protected readonly problems = signal<string[]>([]);
  protected readonly form = inject(FormBuilder).nonNullable.group({
    shape: 'round' as CutShape,
    diameter: '',
    width: '',
    height: '',
    outside: '',
    wall: '',
    count: '1',
    note: '',
  });
  private readonly value = toSignal(this.form.valueChanges, { initialValue: this.form.getRawValue() });
  protected readonly sizes = computed(() => SIZES[(this.value().shape ?? 'round') as CutShape]);

  /** The area these cuts add, from the same maths the server uses; empty until the sizes make sense. */
  protected readonly adds = computed(() => {
    const body = this.body(this.value() as ReturnType<typeof this.form.getRawValue>);
    const checked = cutLogSchema.safeParse(body);
    if (!checked.success) return null;
    const q = (n: number | undefined) => ({ value: n!, unit: body.unit });
    const c = checked.data;
    const section: CutSection =
      c.shape === 'round' ? { shape: 'round', diameter: q(c.diameter) } : c.shape === 'rectangle' ? { shape: 'rectangle', width: q(c.width), height: q(c.height) } : { shape: 'tube', outside: q(c.outside), wall: q(c.wall) };
    const m2 = totalCutArea({ cuts: [{ section, count: c.count }] }).value;
    return areaText(areaFromM2(m2), this.units.system());
  });

  private body(v: ReturnType<typeof this.form.getRawValue>): CutLogBody {
    const number = (s: string | undefined) => (s === undefined || s.trim() === '' ? undefined : Number(s.replace(',', '.')));
    const body: CutLogBody = { shape: v.shape, unit: this.unit(), count: number(v.count) as number };
    for (const f of SIZES[v.shape] ?? []) body[f.id] = number(v[f.id]);
    if (v.note?.trim()) body.note = v.note.trim();
    return body;
  }

  protected async save() {
    this.problems.set([]);
    const body = this.body(this.form.getRawValue());
    const checked = cutLogSchema.safeParse(body);
    if (!checked.success) {
      this.show({ type: '/problems/validation', title: 'Some fields need correcting', status: 400, errors: checked.error.issues.map((i) => ({ pointer: '#/' + i.path.map(String).join('/'), detail: i.message })) });
      return;
    }
    this.saving.set(true);
    try {
      const saved = await this.api.logCuts(this.fittingId(), body);
      this.form.reset();
      this.logged.emit(saved);
    } catch (err) {
      this.show(toProblem(err));
    } finally {
      this.saving.set(false);
    }
  }

  private show(problem: Problem) {
    const left = applyProblemToForm(this.form, problem);
    const lines = left.map((e) => e.detail);
    if (!problem.errors?.length) lines.push(problem.detail ?? problem.title);
    this.problems.set(lines);
  }
}
