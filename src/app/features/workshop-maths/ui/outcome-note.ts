import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { Outcome } from '../calculation';

/** What a card says instead of a result: which figure it is waiting for, or why it cannot answer. */
@Component({
  selector: 'sw-outcome-note',
  template: `
    @switch (note().kind) {
      @case ('waiting') {
        <p class="waiting">{{ note().text }}</p>
      }
      @case ('refused') {
        <p class="refused">{{ note().text }}</p>
      }
    }
  `,
  styles: `
    p {
      margin: 0;
      font: var(--mat-sys-body-large);
    }
    .waiting {
      color: var(--mat-sys-on-surface-variant);
    }
    .refused {
      color: var(--mat-sys-error);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class OutcomeNote {
  readonly outcome = input.required<Outcome<unknown>>();
  protected readonly note = computed(() => {
    const o = this.outcome();
    switch (o.state) {
      case 'waiting':
        return { kind: 'waiting', text: o.message };
      case 'refused':
        return { kind: 'refused', text: o.control === null ? o.message : 'Put right the figure marked above to see the result.' };
      default:
        return { kind: 'none', text: '' };
    }
  });
}
