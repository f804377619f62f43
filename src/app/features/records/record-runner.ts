import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked, viewChild } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { BreakpointObserver } from '@angular/cdk/layout';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatStepper, MatStepperModule } from '@angular/material/stepper';
import { RouterLink } from '@angular/router';
import { MatDialog } from '@angular/material/dialog';
import { firstValueFrom, map, of } from 'rxjs';
import { SignOffApi } from '../sign-off/sign-off-api';
import { SignDialog, type SignDialogData } from '../../shared/ui/sign-dialog/sign-dialog';
import { RECORD_STATUS_LABELS, type RecordDetail, type StepEntryView } from '@setwright/contracts/records';
import { Connection } from '../../core/offline/connection';
import { Outbox } from '../../core/offline/outbox';
import type { EntryItem } from '../../core/offline/outbox-items';
import { toProblem } from '../../core/problem';
import { Session } from '../../core/session';
import { CautionList } from '../../shared/ui/caution/caution-list';
import { SafetyNote } from '../../shared/ui/safety-note';
import { RecordApi } from './record-api';
import { DeviceItems } from './offline/device-items';
import { StepForm } from './step-form';
import { deviceEntryView, latestEntries, STEP_STATE_LABELS, stepState } from './step-state';

/** The runner: a set-up record done step by step at the saw, saved as each step is done. */
@Component({
  selector: 'sw-record-runner',
  imports: [MatStepperModule, MatButtonModule, MatIconModule, MatProgressBarModule, RouterLink, StepForm, CautionList, SafetyNote, DeviceItems],
  templateUrl: './record-runner.html',
  styleUrl: './record-runner.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RecordRunner {
  private readonly api = inject(RecordApi);
  private readonly session = inject(Session);
  private readonly outbox = inject(Outbox);
  protected readonly connection = inject(Connection);
  /** The record id, from the route. */
  readonly id = input.required<string>();

  private readonly stepper = viewChild(MatStepper);
  private readonly dialog = inject(MatDialog);
  private readonly signOffApi = inject(SignOffApi);
  /** From the server, or the copy kept on this tablet when there is no connection. */
  protected readonly record = rxResource({ params: () => this.id(), stream: ({ params }) => this.api.open(params) });
  protected readonly openProblem = computed(() => {
    const err = this.record.error();
    return err ? toProblem((err as { cause?: unknown }).cause ?? err) : null;
  });
  /** This record's items on the tablet: steps waiting to be sent, and any the server would not take. */
  protected readonly deviceItems = computed(() => this.outbox.items().filter((i) => i.recordId === this.id()));
  protected readonly localOnly = computed(() => this.deviceItems().some((i) => i.kind === 'start'));
  protected readonly waitingCount = computed(() => this.deviceItems().filter((i) => i.kind === 'entry' && i.state === 'waiting').length);
  /** Why a returned record came back, from the sign-off history. */
  protected readonly history = rxResource({
    params: () => (this.record.value()?.status === 'returned' ? this.id() : undefined),
    stream: ({ params }) => (params ? this.signOffApi.detail(params) : of(null)),
  });
  protected readonly returnedBecause = computed(() => this.history.value()?.returns.at(-1) ?? null);
  protected readonly finishing = signal(false);
  protected readonly finishProblem = signal<string | null>(null);
  protected readonly narrow = toSignal(inject(BreakpointObserver).observe('(max-width: 700px)').pipe(map((s) => s.matches)), { initialValue: false });

  protected readonly statusLabel = computed(() => {
    const r = this.record.value();
    return r ? RECORD_STATUS_LABELS[r.status] : '';
  });
  protected readonly mine = computed(() => this.record.value()?.startedBy.id === this.session.user()?.id);
  protected readonly writable = computed(() => {
    const r = this.record.value();
    return !!r && this.mine() && (r.status === 'underway' || r.status === 'returned');
  });
  protected readonly selfWitness = computed(() => this.session.roles().includes('competent_person'));
  protected readonly steps = computed(() => {
    const r = this.record.value();
    if (!r) return [];
    // Taken by the server in this session: settled ones, and those of a pass still under way.
    const sending = this.deviceItems().flatMap((i) => (i.kind === 'entry' && i.state === 'delivered' && i.delivered ? [i.delivered] : []));
    const delivered = [...this.outbox.deliveredFor(r.id), ...sending];
    const known = new Set(r.entries.map((e) => e.idempotencyKey));
    const latest = latestEntries([...r.entries, ...delivered.filter((e) => !known.has(e.idempotencyKey))]);
    const onDevice = new Map<string, EntryItem>();
    for (const item of this.deviceItems()) if (item.kind === 'entry' && item.state === 'waiting') onDevice.set(item.request.stepId, item);
    const me = this.session.user();
    return r.procedureBody.steps.map((step) => {
      const kept = onDevice.get(step.id);
      const entry = kept ? deviceEntryView(kept, me ? { id: me.id, displayName: me.displayName } : r.startedBy) : latest.get(step.id);
      const state = stepState(step, entry);
      return { step, entry, state, stateLabel: STEP_STATE_LABELS[state], where: kept ? ('device' as const) : entry ? ('server' as const) : null };
    });
  });
  protected readonly doneCount = computed(() => this.steps().filter((s) => s.entry).length);
  protected readonly onServerCount = computed(() => this.steps().filter((s) => s.where === 'server').length);
  /** Every step on the server, and the server there to sign with. */
  protected readonly canFinish = computed(
    () => !this.finishing() && this.onServerCount() === this.steps().length && !this.waitingCount() && !this.localOnly() && this.connection.online(),
  );
  protected readonly outOfLimits = computed(() => this.steps().filter((s) => s.state === 'out_of_limits'));

  constructor() {
    // Once steps kept on the tablet reach the server, or the connection is back, show the server's record.
    effect(() => {
      const settled = this.outbox.settled();
      if (settled.count && settled.records.has(untracked(this.id))) untracked(() => this.record.reload());
    });
    effect(() => {
      const online = this.connection.online();
      if (online && untracked(() => this.record.value()?.copySavedAt)) untracked(() => this.record.reload());
    });
  }

  protected onSaved(index: number, entry: StepEntryView) {
    this.record.update((r) => (r ? ({ ...r, entries: [...r.entries, entry] } satisfies RecordDetail & { copySavedAt: string | null }) : r));
    this.next(index);
  }

  protected onKept(index: number) {
    this.next(index);
  }

  private next(index: number) {
    const next = this.steps().findIndex((s, i) => i > index && !s.entry);
    const stepper = this.stepper();
    if (stepper) stepper.selectedIndex = next >= 0 ? next : this.steps().length;
  }

  protected async finish(acceptFailed: boolean) {
    const r = this.record.value();
    if (!r) return;
    const data: SignDialogData = {
      action: acceptFailed ? 'Finish as failed and sign' : 'Finish and sign',
      meaning: 'Performed by',
      printedName: this.session.user()?.displayName ?? '',
      statement: acceptFailed
        ? 'You confirm you did every step as recorded, and that readings are left out of limits, so the record fails.'
        : 'You confirm you did every step of this procedure as recorded here.',
    };
    const password = await firstValueFrom(this.dialog.open(SignDialog, { data, width: '520px', maxWidth: '95vw' }).afterClosed());
    if (!password) return;
    this.finishing.set(true);
    this.finishProblem.set(null);
    try {
      this.record.set({ ...(await this.api.finish(r.id, acceptFailed, password)), copySavedAt: null });
    } catch (err) {
      const p = toProblem(err);
      this.finishProblem.set(p.detail ?? p.title);
    } finally {
      this.finishing.set(false);
    }
  }
}
