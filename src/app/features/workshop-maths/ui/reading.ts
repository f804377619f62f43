import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import type { Shown } from '../display';

/** One result: what it is, the figure in large type, its unit beside it. */
@Component({
  selector: 'sw-reading',
  template: `
    <span class="label">{{ label() }}</span>
    <span class="figure">
      <span class="value">{{ shown().value }}</span>
      @if (shown().unit) {
        <span class="unit">{{ shown().unit }}</span>
      }
    </span>
    @if (note()) {
      <span class="note">{{ note() }}</span>
    }
  `,
  styles: `
    :host {
      display: flex;
      flex-direction: column;
      gap: 2px;
      min-width: 0;
    }
    .label {
      font: var(--mat-sys-label-large);
      color: var(--mat-sys-on-surface-variant);
    }
    .figure {
      display: flex;
      flex-wrap: wrap;
      align-items: baseline;
      gap: 6px;
    }
    .value {
      font-size: 1.6rem;
      line-height: 1.2;
      font-weight: 500;
      font-variant-numeric: tabular-nums;
      overflow-wrap: anywhere;
    }
    .unit {
      font: var(--mat-sys-title-medium);
    }
    :host(.large) .value {
      font-size: 2.5rem;
      font-weight: 700;
      color: var(--mat-sys-primary);
    }
    .note {
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  host: { '[class.large]': 'large()' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Reading {
  readonly label = input.required<string>();
  readonly shown = input.required<Shown>();
  readonly note = input('');
  /** The card's main answer, read at arm's length. */
  readonly large = input(false);
}
