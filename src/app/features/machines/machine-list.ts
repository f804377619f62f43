import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatCardModule } from '@angular/material/card';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { MachineSummary } from '@setwright/contracts/machines';
import { RouterLink } from '@angular/router';
import { kindLabel, machineFigures } from './machine-figures';

/** The machine register: every saw with the figures the procedures and maths read. */
@Component({
  selector: 'sw-machine-list',
  imports: [MatCardModule, MatProgressBarModule, RouterLink],
  templateUrl: './machine-list.html',
  styleUrl: './machine-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MachineList {
  private readonly http = inject(HttpClient);
  protected readonly machines = rxResource({ stream: () => this.http.get<MachineSummary[]>('/api/machines') });

  protected readonly kind = (m: MachineSummary) => kindLabel(m.kind);
  protected readonly figures = machineFigures;
}
