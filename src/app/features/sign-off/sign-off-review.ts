import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatExpansionModule } from '@angular/material/expansion';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { firstValueFrom, of } from 'rxjs';
import { RECORD_STATUS_LABELS } from '@setwright/contracts/records';
import { toProblem } from '../../core/problem';
import { Session } from '../../core/session';
import { SafetyNote } from '../../shared/ui/safety-note';
import { SignDialog, type SignDialogData } from '../../shared/ui/sign-dialog/sign-dialog';
import { RecordApi } from '../records/record-api';
import { EntryView } from './entry-view';
import { SendBackDialog } from './send-back-dialog';
import { SignOffApi } from './sign-off-api';

/** A finished record as the competent person reviews it: every entry, computed value, note, witness and photo; then sign off or send back. */
@Component({
  selector: 'sw-sign-off-review',
  imports: [DatePipe, RouterLink, MatButtonModule, MatExpansionModule, MatFormFieldModule, MatInputModule, MatProgressBarModule, EntryView, SafetyNote],
  templateUrl: './sign-off-review.html',
  styleUrl: './sign-off-review.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignOffReview {
  private readonly records = inject(RecordApi);
  private readonly api = inject(SignOffApi);
  private readonly session = inject(Session);
  private readonly dialog = inject(MatDialog);
  private readonly router = inject(Router);
  readonly id = input.required<string>();

  protected readonly record = rxResource({ params: () => this.id(), stream: ({ params }) => this.records.get(params) });
  protected readonly signatures = rxResource({ params: () => this.id(), stream: ({ params }) => this.api.detail(params) });
  protected readonly trail = rxResource({
    params: () => (this.session.hasAnyRole(['competent_person', 'auditor', 'workshop_admin']) ? this.id() : undefined),
    stream: ({ params }) => (params ? this.api.audit(params) : of([])),
  });
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly statusLabels = RECORD_STATUS_LABELS;

  protected readonly steps = computed(() => {
    const r = this.record.value();
    if (!r) return [];
    return r.procedureBody.steps.map((step) => {
      const attempts = r.entries.filter((e) => e.stepId === step.id).sort((a, b) => a.attempt - b.attempt);
      return { step, attempts, latest: attempts.at(-1) };
    });
  });
  protected readonly mayDecide = computed(() => {
    const r = this.record.value();
    return !!r && r.status === 'ready_for_signoff' && this.session.roles().includes('competent_person') && r.startedBy.id !== this.session.user()?.id;
  });
  protected readonly ownRecord = computed(() => this.record.value()?.startedBy.id === this.session.user()?.id);
  protected readonly mayAddAddendum = computed(
    () => this.record.value()?.status === 'signed_off' && this.session.hasAnyRole(['competent_person', 'workshop_admin']),
  );

  protected async signOff() {
    const r = this.record.value()!;
    const data: SignDialogData = {
      action: 'Sign off this record',
      meaning: 'Approved by',
      printedName: this.session.user()?.displayName ?? '',
      statement: `You have reviewed "${r.procedure.title}" on ${r.machine.name} and approve it. It will be locked: later corrections can only be added as addenda.`,
    };
    const password = await this.ask<string>(SignDialog, data);
    if (!password) return;
    await this.act(async () => {
      await this.api.signOff(r.id, password);
      this.record.reload();
      this.signatures.reload();
      this.trail.reload();
    });
  }

  protected async sendBack() {
    const reason = await this.ask<string>(SendBackDialog, undefined);
    if (!reason) return;
    await this.act(async () => {
      await this.api.sendBack(this.id(), reason);
      await this.router.navigate(['/to-sign']);
    });
  }

  protected async addAddendum(text: string) {
    if (text.trim().length < 5) {
      this.problem.set('Write the addendum first.');
      return;
    }
    const data: SignDialogData = {
      action: 'Sign the addendum',
      meaning: 'Addendum by',
      printedName: this.session.user()?.displayName ?? '',
      statement: 'The addendum is added to the locked record with your signature. The record itself does not change.',
    };
    const password = await this.ask<string>(SignDialog, data);
    if (!password) return;
    await this.act(async () => {
      await this.api.addAddendum(this.id(), text.trim(), password);
      this.signatures.reload();
    });
  }

  private ask<T>(component: new (...args: never[]) => unknown, data: unknown): Promise<T | undefined> {
    return firstValueFrom(this.dialog.open(component, { data, width: '560px', maxWidth: '95vw' }).afterClosed());
  }

  private async act(work: () => Promise<void>) {
    this.busy.set(true);
    this.problem.set(null);
    try {
      await work();
    } catch (err) {
      const p = toProblem(err);
      this.problem.set(p.detail ?? p.title);
    } finally {
      this.busy.set(false);
    }
  }
}
