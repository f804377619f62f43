import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { BLADE_MATERIAL_LABELS, BLADE_MATERIALS, bladeTypeSchema, type BladeTypeView } from '@setwright/contracts/blades';
import { applyProblemToForm, toProblem, type Problem } from '../../core/problem';
import { BladeApi, type BladeTypeBody } from './blade-api';

/** Add a blade type to the stock list, or change one (sizes, pitch, stock, whether it is listed). Workshop admins. */
@Component({
  selector: 'sw-blade-type-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatCheckboxModule, MatButtonModule],
  template: `
    <h2 mat-dialog-title>{{ editing ? 'Change blade type' : 'Add a blade type' }}</h2>
    <form [formGroup]="form" (ngSubmit)="save()" novalidate>
      <mat-dialog-content>
        <div class="sizes">
          <mat-form-field appearance="outline">
            <mat-label>Width</mat-label>
            <input matInput formControlName="widthMm" inputmode="decimal" required />
            <span matTextSuffix>mm</span>
            <mat-error>{{ error('widthMm') }}</mat-error>
          </mat-form-field>
          <mat-form-field appearance="outline">
            <mat-label>Thickness</mat-label>
            <input matInput formControlName="thicknessMm" inputmode="decimal" required />
            <span matTextSuffix>mm</span>
            <mat-error>{{ error('thicknessMm') }}</mat-error>
          </mat-form-field>
          <mat-form-field appearance="outline">
            <mat-label>Length</mat-label>
            <input matInput formControlName="lengthMm" inputmode="numeric" required />
            <span matTextSuffix>mm</span>
            <mat-error>{{ error('lengthMm') }}</mat-error>
          </mat-form-field>
        </div>
        <div class="sizes">
          <mat-form-field appearance="outline">
            <mat-label>Tooth pitch</mat-label>
            <input matInput formControlName="pitch" required />
            <span matTextSuffix>TPI</span>
            <mat-hint>6 for constant, 6/10 for variable</mat-hint>
            <mat-error>{{ error('pitch') }}</mat-error>
          </mat-form-field>
          <mat-form-field appearance="outline">
            <mat-label>Material</mat-label>
            <mat-select formControlName="material" required>
              @for (m of materials; track m) {
                <mat-option [value]="m">{{ materialLabels[m] }}</mat-option>
              }
            </mat-select>
            <mat-error>{{ error('material') }}</mat-error>
          </mat-form-field>
          <mat-form-field appearance="outline">
            <mat-label>In stock</mat-label>
            <input matInput formControlName="stock" inputmode="numeric" required />
            <span matTextSuffix>blades</span>
            <mat-error>{{ error('stock') }}</mat-error>
          </mat-form-field>
        </div>
        <mat-form-field appearance="outline" class="wide">
          <mat-label>Note (where it is kept, order code)</mat-label>
          <input matInput formControlName="note" maxlength="200" />
          <mat-error>{{ error('note') }}</mat-error>
        </mat-form-field>
        @if (editing) {
          <mat-checkbox formControlName="listed">On the stock list</mat-checkbox>
        }
        @for (line of problems(); track line) {
          <p class="problem" role="alert">{{ line }}</p>
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button class="sw-primary-action" type="submit" [disabled]="saving()">{{ editing ? 'Save' : 'Add' }}</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .sizes {
      display: grid;
      grid-template-columns: repeat(auto-fit, minmax(150px, 1fr));
      gap: 0 12px;
    }
    .wide {
      width: 100%;
    }
    .problem {
      color: var(--mat-sys-error);
      font-weight: 500;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BladeTypeDialog {
  private readonly api = inject(BladeApi);
  private readonly ref = inject(MatDialogRef<BladeTypeDialog, BladeTypeView>);
  private readonly type = inject<BladeTypeView | null>(MAT_DIALOG_DATA, { optional: true });
  protected readonly editing = !!this.type;
  protected readonly materials = BLADE_MATERIALS;
  protected readonly materialLabels = BLADE_MATERIAL_LABELS;
  protected readonly saving = signal(false);
  protected readonly problems = signal<string[]>([]);
  protected readonly form = inject(FormBuilder).nonNullable.group({
    widthMm: this.type ? String(this.type.widthMm) : '',
    thicknessMm: this.type ? String(this.type.thicknessMm) : '',
    lengthMm: this.type ? String(this.type.lengthMm) : '',
    pitch: this.type?.pitch ?? '',
    material: (this.type?.material ?? '') as string,
    stock: this.type ? String(this.type.stock) : '0',
    note: this.type?.note ?? '',
    listed: this.type?.listed ?? true,
  });

  protected error(name: keyof typeof this.form.controls): string {
    const errors = this.form.controls[name].errors;
    return (errors?.['server'] as string | undefined) ?? '';
  }

  protected async save() {
    this.problems.set([]);
    const v = this.form.getRawValue();
    const number = (s: string) => (s.trim() === '' ? undefined : Number(s.replace(',', '.')));
    const body = {
      widthMm: number(v.widthMm),
      thicknessMm: number(v.thicknessMm),
      lengthMm: number(v.lengthMm),
      pitch: v.pitch,
      material: v.material || undefined,
      stock: number(v.stock),
      note: v.note.trim() || null,
    };
    // The same rules the server applies, so most mistakes show before anything is sent.
    const checked = bladeTypeSchema.safeParse(body);
    if (!checked.success) {
      this.show({ type: '/problems/validation', title: 'Some fields need correcting', status: 400, errors: checked.error.issues.map((i) => ({ pointer: '#/' + i.path.map(String).join('/'), detail: i.message })) });
      return;
    }
    this.saving.set(true);
    try {
      const sent = body as BladeTypeBody;
      const saved = this.type ? await this.api.changeType(this.type.id, { ...sent, listed: v.listed }) : await this.api.addType(sent);
      this.ref.close(saved);
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
