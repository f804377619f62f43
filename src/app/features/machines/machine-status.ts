import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { MachineStatus } from '@setwright/contracts/machines';

const ICONS = { ready: 'check_circle', check_due: 'warning', tagged_out: 'block' } as const;

/**
 * A machine's state in our words and safety colours: Tagged out in red (prohibition), Check due in
 * yellow with black (warning), Ready in green with a tick (safe condition). The words always carry
 * the meaning; the colour and mark only repeat it.
 */
@Component({
  selector: 'sw-machine-status',
  imports: [MatIconModule],
  template: `
    <mat-icon aria-hidden="true">{{ icon() }}</mat-icon>
    <span class="label">{{ status().label }}</span>
    @if (detail() && status().state === 'check_due') {
      <span class="count">· {{ status().dueCount }} check{{ status().dueCount === 1 ? '' : 's' }}</span>
    }
  `,
  styles: `
    :host {
      display: inline-flex;
      align-items: center;
      gap: 6px;
      min-height: 32px;
      padding: 2px 12px 2px 8px;
      border-radius: 16px;
      font-weight: 700;
      border: 2px solid transparent;
    }
    :host(.ready) {
      background: var(--sw-safety-safe);
      color: #fff;
    }
    :host(.check_due) {
      background: var(--sw-safety-warning);
      color: #000;
      border-color: #000;
    }
    :host(.tagged_out) {
      background: var(--sw-safety-prohibition);
      color: #fff;
    }
    mat-icon {
      font-size: 20px;
      width: 20px;
      height: 20px;
    }
  `,
  host: { '[class]': 'status().state' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MachineStatusBadge {
  readonly status = input.required<MachineStatus>();
  /** Also say how many checks are due. */
  readonly detail = input(false);
  protected readonly icon = computed(() => ICONS[this.status().state]);
}
