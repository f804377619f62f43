import { ChangeDetectionStrategy, Component, input, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import type { Working } from '../formulas';

let next = 0;

/** "How this is worked out": the formula and its source, folded away until asked for. */
@Component({
  selector: 'sw-formula-line',
  imports: [MatButtonModule, MatIconModule],
  template: `
    <button mat-button type="button" (click)="open.set(!open())" [attr.aria-expanded]="open()" [attr.aria-controls]="id">
      <mat-icon aria-hidden="true">{{ open() ? 'expand_less' : 'expand_more' }}</mat-icon>
      How this is worked out
    </button>
    <div class="working" [id]="id" [hidden]="!open()">
      <ul>
        @for (line of working().formula; track $index) {
          <li>{{ line }}</li>
        }
      </ul>
      <ng-content />
      <p class="source"><strong>Source:</strong> {{ working().source }}</p>
    </div>
  `,
  styles: `
    :host {
      display: block;
      margin-top: 12px;
    }
    button {
      margin-left: -12px;
    }
    .working {
      font: var(--mat-sys-body-medium);
      padding: 4px 0 8px;
    }
    ul {
      margin: 0 0 8px;
      padding-left: 20px;
    }
    li {
      margin-bottom: 4px;
    }
    .source {
      margin: 0;
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FormulaLine {
  readonly working = input.required<Working>();
  protected readonly open = signal(false);
  protected readonly id = `maths-working-${++next}`;
}
