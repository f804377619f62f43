import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { Connection } from './connection';
import { Outbox } from './outbox';

/**
 * The shell's connection and queue indicator: online or not, and how much waits on this device.
 * Changes are announced politely to screen readers.
 */
@Component({
  selector: 'sw-connection-status',
  imports: [MatIconModule, RouterLink],
  template: `
    <div class="status" role="status" aria-live="polite" aria-atomic="true" [attr.data-state]="state()">
      <mat-icon aria-hidden="true">{{ icon() }}</mat-icon>
      <span class="line">
        <span class="where">{{ label() }}</span>
        @if (detail(); as d) {
          <span class="queue">{{ d }}</span>
        }
      </span>
    </div>
    @if (firstConflict(); as recordId) {
      <a class="decide" [routerLink]="['/records', recordId]">{{ conflictText() }}</a>
    }
  `,
  styleUrl: './connection-status.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'sw-connection-status' },
})
export class ConnectionStatus {
  private readonly connection = inject(Connection);
  private readonly outbox = inject(Outbox);

  protected readonly state = this.connection.state;
  protected readonly icon = computed(() => (this.state() === 'online' ? (this.outbox.draining() ? 'sync' : 'wifi') : 'wifi_off'));
  protected readonly label = computed(() => {
    switch (this.state()) {
      case 'online':
        return 'Online';
      case 'offline':
        return 'Offline';
      default:
        return 'Server not reachable';
    }
  });
  protected readonly detail = computed(() => {
    const n = this.outbox.waiting();
    if (n === 0) return this.state() === 'online' ? null : 'Steps you save are kept on this device';
    if (this.outbox.signInNeeded()) return `${n} waiting on this device · sign in again to send`;
    if (this.outbox.draining()) return `Sending ${n} from this device…`;
    return `${n} waiting on this device`;
  });
  protected readonly firstConflict = computed(() => this.outbox.conflicts()[0]?.recordId ?? null);
  protected readonly conflictText = computed(() => {
    const n = this.outbox.conflicts().length;
    return n === 1 ? '1 needs your decision' : `${n} need your decision`;
  });
}
