import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { MachineListItem } from '@setwright/contracts/machines';
import { Session } from '../../core/session';
import { MachineApi, openPdf } from './machine-api';
import { kindLabel, machineFigures } from './machine-figures';
import { MachineStatusBadge } from './machine-status';

/** The machine register: every saw with its state and the figures the procedures and maths read. */
@Component({
  selector: 'sw-machine-list',
  imports: [MatButtonModule, MatCardModule, MatIconModule, MatProgressBarModule, RouterLink, MachineStatusBadge],
  templateUrl: './machine-list.html',
  styleUrl: './machine-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MachineList {
  private readonly api = inject(MachineApi);
  protected readonly machines = rxResource({ stream: () => this.api.list() });
  private readonly session = inject(Session);
  protected readonly isAdmin = computed(() => this.session.roles().includes('workshop_admin'));
  protected readonly printing = signal(false);

  protected readonly kind = (m: MachineListItem) => kindLabel(m.kind);
  protected readonly figures = machineFigures;

  protected async printLabels() {
    this.printing.set(true);
    try {
      openPdf(await this.api.labels(), 'qr-labels.pdf');
    } catch {
      // the problem interceptor has already said why
    } finally {
      this.printing.set(false);
    }
  }
}
