import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { RECORD_STATUS_LABELS } from '@setwright/contracts/records';
import { of } from 'rxjs';
import { RecordApi } from '../records/record-api';
import { SignOffApi } from '../sign-off/sign-off-api';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { ROLE_LABELS, type Role } from '@setwright/contracts/roles';
import { PLACES } from '../../core/places';
import { Session } from '../../core/session';
import { SafetyNote } from '../../shared/ui/safety-note';
import { DueChecks } from './due-checks';

/** What each role is for in Setwright, in the workshop's words. */
const DUTIES: Record<Role, string[]> = {
  trainee: [
    'Open a saw from its QR label or the machine register.',
    'Run a set-up procedure step by step, entering readings and taking photos.',
    'Ask a competent person to witness any check run with power on.',
  ],
  competent_person: [
    'Witness powered checks at the saw with your own sign-in.',
    'Review finished records, then sign them off or send them back with a reason.',
    'Grant competencies to trainees once they have enough witnessed runs.',
  ],
  auditor: [
    'Search the signed records of every machine.',
    'Download a record’s PDF, or an evidence pack for a date range.',
    'Run a record check to prove a record has not been altered.',
  ],
  workshop_admin: [
    'Keep the machine register and each saw’s figures up to date.',
    'Manage people and roles, blades in stock and check schedules.',
    'Draft procedure versions and have them approved by someone else.',
  ],
};

@Component({
  selector: 'sw-today',
  imports: [MatCardModule, MatIconModule, MatButtonModule, RouterLink, SafetyNote, DueChecks],
  templateUrl: './today.html',
  styleUrl: './today.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Today {
  private readonly session = inject(Session);
  /** Set when a role guard sent the person here. */
  readonly denied = input<string>();

  protected readonly user = this.session.user;
  protected readonly roles = computed(() =>
    this.session.roles().map((role) => ({ role, label: ROLE_LABELS[role], duties: DUTIES[role] })),
  );
  private readonly api = inject(RecordApi);
  private readonly signOffApi = inject(SignOffApi);
  protected readonly runs = computed(() => this.session.hasAnyRole(['trainee', 'competent_person']));
  /** The person's own records that are still open: underway, or returned to them. */
  protected readonly open = rxResource({
    params: () => this.runs(),
    stream: ({ params }) => (params ? this.api.list({ mine: true }) : of([])),
  });
  protected readonly openRecords = computed(() => (this.open.value() ?? []).filter((r) => r.status === 'underway' || r.status === 'returned'));
  protected readonly statusLabels = RECORD_STATUS_LABELS;
  protected readonly signs = computed(() => this.session.roles().includes('competent_person'));
  protected readonly waiting = rxResource({
    params: () => this.signs(),
    stream: ({ params }) => (params ? this.signOffApi.queue() : of([])),
  });
  protected readonly places = computed(() => PLACES.filter((p) => p.path !== '/today' && this.session.hasAnyRole(p.roles)));
}
