import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import type { MachineSummary } from '@setwright/contracts/machines';
import { RECORD_STATUS_LABELS } from '@setwright/contracts/records';
import { of } from 'rxjs';
import { Session } from '../../core/session';
import { RecordApi } from '../records/record-api';
import { machineFigures } from './machine-figures';

/** One machine: its figures, the procedures that can be run on it, and its records. */
@Component({
  selector: 'sw-machine-page',
  imports: [MatButtonModule, MatIconModule, MatProgressBarModule, RouterLink],
  templateUrl: './machine-page.html',
  styleUrl: './machine-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MachinePage {
  private readonly http = inject(HttpClient);
  private readonly api = inject(RecordApi);
  private readonly router = inject(Router);
  private readonly session = inject(Session);
  readonly id = input.required<string>();

  protected readonly machine = rxResource({ params: () => this.id(), stream: ({ params }) => this.http.get<MachineSummary>(`/api/machines/${params}`) });
  protected readonly procedures = rxResource({
    params: () => this.machine.value()?.kind,
    stream: ({ params }) => (params ? this.api.procedures(params) : of([])),
  });
  protected readonly records = rxResource({ params: () => this.id(), stream: ({ params }) => this.api.list({ machineId: params }) });
  protected readonly canRun = computed(() => this.session.hasAnyRole(['trainee', 'competent_person']));
  protected readonly starting = signal<string | null>(null);
  protected readonly figures = computed(() => {
    const m = this.machine.value();
    return m ? machineFigures(m) : [];
  });
  protected readonly statusLabels = RECORD_STATUS_LABELS;

  protected async start(procedureKey: string) {
    this.starting.set(procedureKey);
    try {
      const record = await this.api.start(this.id(), procedureKey);
      await this.router.navigate(['/records', record.id]);
    } catch {
      // the problem interceptor has already said why
    } finally {
      this.starting.set(null);
    }
  }
}
