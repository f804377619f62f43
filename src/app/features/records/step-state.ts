import type { PersonRef, StepEntryView } from '@setwright/contracts/records';
import type { Step } from '@setwright/procedures/schema';
import type { EntryItem } from '../../core/offline/outbox-items';

/** A step's state on the runner, in our own words. */
export type StepState = 'not_started' | 'done' | 'out_of_limits' | 'waiting_for_witness';

export const STEP_STATE_LABELS: Record<StepState, string> = {
  not_started: 'Not started',
  done: 'Done',
  out_of_limits: 'Out of limits',
  waiting_for_witness: 'Waiting for witness',
};

export function stepState(step: Step, latest: StepEntryView | undefined): StepState {
  if (!latest) return step.powered ? 'waiting_for_witness' : 'not_started';
  return latest.outcome === 'done' ? 'done' : 'out_of_limits';
}

/** The latest attempt of each step (entries come oldest first). */
export function latestEntries(entries: readonly StepEntryView[]): Map<string, StepEntryView> {
  const latest = new Map<string, StepEntryView>();
  for (const e of entries) {
    const seen = latest.get(e.stepId);
    if (!seen || seen.attempt < e.attempt) latest.set(e.stepId, e);
  }
  return latest;
}

/** Where a step's latest entry is: on the server, or waiting on this device. */
export type EntryPlace = 'server' | 'device';

export const ENTRY_PLACE_LABELS: Record<EntryPlace, string> = {
  server: 'Saved on the server',
  device: 'Waiting on this device',
};

/** A step kept on the device, shown as the entry it will become (judged by the tablet's own maths). */
export function deviceEntryView(item: EntryItem, enteredBy: PersonRef): StepEntryView {
  return {
    id: `device-${item.seq}`,
    stepId: item.request.stepId,
    attempt: item.basedOn.attempt + 1,
    values: item.request.values,
    evaluation: item.preview.evaluation,
    outcome: item.preview.outcome,
    correctiveNote: item.request.correctiveNote ?? null,
    enteredBy,
    witnessedBy: null,
    witnessedAt: null,
    idempotencyKey: item.request.idempotencyKey,
    createdAt: item.createdAt,
  };
}
