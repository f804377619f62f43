import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import type { RecordDetail } from '@setwright/contracts/records';
import { Outbox } from '../../../core/offline/outbox';
import type { ConflictReason, OutboxItem } from '../../../core/offline/outbox-items';

const REASON_TITLES: Record<ConflictReason, string> = {
  closed: 'The record was closed meanwhile',
  'sent-back': 'The record was sent back meanwhile',
  changed: 'Changed from another device',
  refused: 'The server did not take this',
  missing: 'The record is not there',
  'procedure-changed': 'The procedure changed',
  held: 'Waiting on another item',
};

interface Shown {
  seq: number;
  kind: OutboxItem['kind'];
  state: OutboxItem['state'];
  title: string;
  reason: string;
  detail: string;
  lines: { label: string; value: string }[];
  canSendAgain: boolean;
}

/**
 * What the server would not take as it stands, for one record: a clear message and a choice,
 * never a silent overwrite or loss. Keep the tablet's copy for reference, discard it after
 * seeing it, or send a step again as a new attempt when the record is open again.
 */
@Component({
  selector: 'sw-device-items',
  imports: [MatButtonModule],
  templateUrl: './device-items.html',
  styleUrl: './device-items.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DeviceItems {
  private readonly outbox = inject(Outbox);
  readonly items = input.required<readonly OutboxItem[]>();
  readonly record = input.required<RecordDetail>();

  protected readonly busy = signal<number | null>(null);
  protected readonly message = signal<string | null>(null);

  protected readonly shown = computed<Shown[]>(() => {
    const r = this.record();
    const open = r.status === 'underway' || r.status === 'returned';
    return this.items()
      .filter((i) => i.state === 'conflict' || i.state === 'kept')
      .map((i) => {
        const base = { seq: i.seq!, kind: i.kind, state: i.state, reason: i.problem ? REASON_TITLES[i.problem.reason] : '', detail: i.problem?.detail ?? '' };
        if (i.kind === 'entry') {
          const step = r.procedureBody.steps.find((s) => s.id === i.request.stepId);
          const lines = (step?.inputs ?? []).map((input) => ({ label: input.label, value: this.show(i.request.values[input.id], 'unit' in input ? input.unit : undefined) }));
          if (i.request.correctiveNote) lines.push({ label: 'Corrective note', value: i.request.correctiveNote });
          return { ...base, title: step?.title ?? i.request.stepId, lines, canSendAgain: open && i.problem?.reason !== 'missing' };
        }
        if (i.kind === 'start') return { ...base, title: 'Starting this record', lines: [], canSendAgain: false };
        return { ...base, title: `Photo ${i.fileName}`, lines: [], canSendAgain: false };
      });
  });
  protected readonly conflictCount = computed(() => this.shown().filter((s) => s.state === 'conflict').length);

  protected async keep(seq: number) {
    await this.act(seq, () => this.outbox.keepForReference(seq));
  }

  protected async discard(seq: number) {
    await this.act(seq, () => this.outbox.discard(seq));
  }

  protected async sendAgain(seq: number) {
    await this.act(seq, async () => {
      const why = await this.outbox.sendAgain(seq);
      if (why) this.message.set(why);
    });
  }

  private async act(seq: number, fn: () => Promise<void>) {
    this.busy.set(seq);
    this.message.set(null);
    try {
      await fn();
    } finally {
      this.busy.set(null);
    }
  }

  private show(value: unknown, unit?: string): string {
    if (value === null || value === undefined || value === '') return '—';
    if (typeof value === 'boolean') return value ? 'Yes' : 'No';
    if (Array.isArray(value)) return value.length === 1 ? '1 photo' : `${value.length} photos`;
    return unit ? `${String(value)} ${unit}` : String(value);
  }
}
