import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import type { MachineDetail } from '@setwright/contracts/machines';
import { RECORD_STATUS_LABELS } from '@setwright/contracts/records';
import { DUE_STATE_LABELS, SCHEDULE_TRIGGER_LABELS, type ScheduleView } from '@setwright/contracts/schedules';
import { of } from 'rxjs';
import { Session } from '../../core/session';
import { RecordApi } from '../records/record-api';
import { MachineApi, openPdf } from './machine-api';
import { kindLabel, machineFigures } from './machine-figures';
import { MachinePhoto } from './machine-photo';
import { MachineStatusBadge } from './machine-status';
import { ReadingTrends } from './reading-trends';

/** One machine: its state, blade, checks due, the procedures that can be started on it, and its history. */
@Component({
  selector: 'sw-machine-page',
  imports: [DatePipe, MatButtonModule, MatIconModule, MatProgressBarModule, RouterLink, MachineStatusBadge, MachinePhoto, ReadingTrends],
  templateUrl: './machine-page.html',
  styleUrl: './machine-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MachinePage {
  private readonly machines = inject(MachineApi);
  private readonly api = inject(RecordApi);
  private readonly router = inject(Router);
  private readonly session = inject(Session);
  readonly id = input.required<string>();

  protected readonly machine = rxResource({ params: () => this.id(), stream: ({ params }) => this.machines.get(params) });
  protected readonly procedures = rxResource({
    params: () => this.machine.value()?.kind,
    stream: ({ params }) => (params ? this.api.procedures(params) : of([])),
  });
  /** Records still open on this saw (signed ones are in the history). */
  protected readonly records = rxResource({ params: () => this.id(), stream: ({ params }) => this.api.list({ machineId: params }) });
  protected readonly openRecords = computed(() => (this.records.value() ?? []).filter((r) => r.status !== 'signed_off' && r.status !== 'voided'));
  protected readonly canRun = computed(() => this.session.hasAnyRole(['trainee', 'competent_person']));
  protected readonly isAdmin = computed(() => this.session.roles().includes('workshop_admin'));
  /** Competent persons, auditors and admins open any record; trainees only their own. */
  protected readonly readsRecords = computed(() => this.session.hasAnyRole(['competent_person', 'auditor', 'workshop_admin']));
  protected readonly starting = signal<string | null>(null);
  protected readonly printing = signal(false);
  protected readonly figures = computed(() => {
    const m = this.machine.value();
    return m ? machineFigures(m) : [];
  });
  protected readonly kind = computed(() => kindLabel(this.machine.value()?.kind ?? ''));
  /** Each procedure's schedule, by key. */
  protected readonly scheduleFor = computed(() => new Map((this.machine.value()?.schedules ?? []).map((s) => [s.procedureKey, s])));
  protected readonly statusLabels = RECORD_STATUS_LABELS;
  protected readonly dueLabels = DUE_STATE_LABELS;

  protected mayStart(m: MachineDetail, key: string): boolean {
    return m.startable === 'all' || m.startable.includes(key);
  }

  protected triggers(s: ScheduleView): string {
    return s.triggers.map((t) => SCHEDULE_TRIGGER_LABELS[t].toLowerCase()).join(', ');
  }

  protected async start(procedureKey: string) {
    this.starting.set(procedureKey);
    try {
      const record = await this.api.start(this.id(), procedureKey);
      await this.router.navigate(['/records', record.id]);
    } catch {
      // the problem interceptor has already said why
      this.machine.reload();
    } finally {
      this.starting.set(null);
    }
  }

  protected async printLabel(m: MachineDetail) {
    this.printing.set(true);
    try {
      openPdf(await this.machines.labels([m.id]), `qr-label-${m.assetTag}.pdf`);
    } catch {
      // the problem interceptor has already said why
    } finally {
      this.printing.set(false);
    }
  }
}
