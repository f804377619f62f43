import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatChipsModule } from '@angular/material/chips';
import type { ProcedureStatus } from '@setwright/contracts/procedures';
import { STATUS_LABELS } from './procedure-words';

/** A version's state as a chip: Draft · Approved · Retired (our own colours, not safety colours). */
@Component({
  selector: 'sw-status-chip',
  imports: [MatChipsModule],
  template: `<mat-chip-set [attr.aria-label]="'State: ' + label()"><mat-chip [class]="'state-' + status()" [disableRipple]="true">{{ label() }}</mat-chip></mat-chip-set>`,
  styles: `
    :host { display: inline-block; vertical-align: middle; }
    .state-draft { --mat-chip-elevated-container-color: #e6e0d2; --mat-chip-label-text-color: #3a3222; }
    .state-approved { --mat-chip-elevated-container-color: var(--mat-sys-primary-container); --mat-chip-label-text-color: var(--mat-sys-on-primary-container); }
    .state-retired { --mat-chip-elevated-container-color: #dedede; --mat-chip-label-text-color: #44484b; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class StatusChip {
  readonly status = input.required<ProcedureStatus>();
  protected readonly label = computed(() => STATUS_LABELS[this.status()]);
}
