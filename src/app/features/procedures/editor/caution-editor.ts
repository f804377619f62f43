import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { ReactiveFormsModule, type FormArray } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { ISO_7010_CODES } from '@setwright/procedures/schema';
import { CAUTION_LEVEL_LABELS, SIGN_MEANINGS } from '../procedure-words';
import { cautionForm, moveItem, problemOf, type CautionForm } from './draft-form';

/** A list of cautions: level (its ISO 3864 colour), ISO 7010 sign and our own text. */
@Component({
  selector: 'sw-caution-editor',
  imports: [ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule],
  template: `
    <fieldset class="list">
      <legend>{{ legend() }}</legend>
      @for (c of cautions().controls; track c; let i = $index) {
        <div class="row caution-row" role="group" [attr.aria-label]="itemName() + ' ' + (i + 1)">
          <mat-form-field appearance="outline">
            <mat-label>Kind</mat-label>
            <mat-select [formControl]="c.controls.level">
              @for (l of levels; track l.value) {
                <mat-option [value]="l.value">{{ l.label }}</mat-option>
              }
            </mat-select>
            <mat-error>{{ problem(c.controls.level) }}</mat-error>
          </mat-form-field>
          <mat-form-field appearance="outline">
            <mat-label>ISO 7010 sign</mat-label>
            <mat-select [formControl]="c.controls.code">
              <mat-option value="">No sign</mat-option>
              @for (code of codes; track code) {
                <mat-option [value]="code">{{ code }} · {{ meaning(code) }}</mat-option>
              }
            </mat-select>
            <mat-error>{{ problem(c.controls.code) }}</mat-error>
          </mat-form-field>
          <mat-form-field appearance="outline" class="grow">
            <mat-label>What it says</mat-label>
            <textarea matInput [formControl]="c.controls.text" rows="2"></textarea>
            <mat-error>{{ problem(c.controls.text) }}</mat-error>
          </mat-form-field>
          <div class="row-actions">
            <button mat-icon-button type="button" (click)="move(i, -1)" [disabled]="i === 0" [attr.aria-label]="'Move ' + itemName() + ' ' + (i + 1) + ' up'">
              <mat-icon>arrow_upward</mat-icon>
            </button>
            <button mat-icon-button type="button" (click)="move(i, 1)" [disabled]="i === cautions().length - 1" [attr.aria-label]="'Move ' + itemName() + ' ' + (i + 1) + ' down'">
              <mat-icon>arrow_downward</mat-icon>
            </button>
            <button mat-icon-button type="button" (click)="remove(i)" [attr.aria-label]="'Remove ' + itemName() + ' ' + (i + 1)">
              <mat-icon>delete</mat-icon>
            </button>
          </div>
        </div>
      } @empty {
        <p class="empty">None.</p>
      }
      <button mat-stroked-button type="button" (click)="add()"><mat-icon>add</mat-icon> {{ addLabel() }}</button>
    </fieldset>
  `,
  styleUrl: './editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CautionEditor {
  readonly cautions = input.required<FormArray<CautionForm>>();
  readonly legend = input('Cautions');
  readonly itemName = input('caution');
  readonly addLabel = input('Add a caution');
  readonly revision = input(0);

  protected readonly levels = (Object.keys(CAUTION_LEVEL_LABELS) as (keyof typeof CAUTION_LEVEL_LABELS)[]).map((value) => ({ value, label: CAUTION_LEVEL_LABELS[value] }));
  protected readonly codes = ISO_7010_CODES;
  protected readonly problem = problemOf;
  protected meaning(code: string) {
    return SIGN_MEANINGS[code] ?? '';
  }

  protected add() {
    this.cautions().push(cautionForm());
  }
  protected remove(i: number) {
    this.cautions().removeAt(i);
  }
  protected move(i: number, by: -1 | 1) {
    moveItem(this.cautions(), i, by);
  }
}
