import type { RecordState, RecordSummary, StepEntryView } from '../../contracts/records';
import type { User } from '../people/model';
import type { SetupRecord, StepEntry } from './model';

const ref = (u: User | undefined | null) => (u ? { id: u.id, displayName: u.displayName } : null);

export function entryView(e: StepEntry): StepEntryView {
  return {
    id: e.id,
    stepId: e.stepId,
    attempt: e.attempt,
    values: e.values,
    evaluation: e.evaluation,
    outcome: e.outcome,
    correctiveNote: e.correctiveNote,
    enteredBy: ref(e.enteredBy) ?? { id: e.enteredById, displayName: '' },
    witnessedBy: ref(e.witnessedBy),
    witnessedAt: e.witnessedAt ? e.witnessedAt.toISOString() : null,
    idempotencyKey: e.idempotencyKey,
    createdAt: e.createdAt.toISOString(),
  };
}

export function recordSummary(r: SetupRecord): RecordSummary {
  const pv = r.procedureVersion!;
  return {
    id: r.id,
    status: r.status,
    result: r.result,
    machine: { id: r.machine!.id, name: r.machine!.name, assetTag: r.machine!.assetTag },
    procedure: { id: pv.id, key: pv.key, version: pv.version, title: pv.title },
    startedBy: ref(r.startedBy) ?? { id: r.startedById, displayName: '' },
    createdAt: r.createdAt.toISOString(),
    finishedAt: r.finishedAt ? r.finishedAt.toISOString() : null,
  };
}

/** A record as it stands, without its procedure's body (the client has that, by version). */
export function recordState(r: SetupRecord, entries: StepEntryView[]): RecordState {
  return {
    ...recordSummary(r),
    machineSpec: r.machineSpec,
    entries,
    voidReason: r.voidReason,
  };
}

/** A step entry as the entries query returns it (snake_case columns, names joined in). */
export interface EntryRow {
  id: string;
  step_id: string;
  attempt: number;
  values: Record<string, unknown>;
  evaluation: StepEntryView['evaluation'];
  outcome: StepEntryView['outcome'];
  corrective_note: string | null;
  entered_by_id: string;
  entered_by_name: string | null;
  witnessed_by_id: string | null;
  witnessed_by_name: string | null;
  witnessed_at: Date | null;
  idempotency_key: string;
  created_at: Date;
}

export function entryRowView(e: EntryRow): StepEntryView {
  return {
    id: e.id,
    stepId: e.step_id,
    attempt: e.attempt,
    values: e.values,
    evaluation: e.evaluation,
    outcome: e.outcome,
    correctiveNote: e.corrective_note,
    enteredBy: { id: e.entered_by_id, displayName: e.entered_by_name ?? '' },
    witnessedBy: e.witnessed_by_id ? { id: e.witnessed_by_id, displayName: e.witnessed_by_name ?? '' } : null,
    witnessedAt: e.witnessed_at ? new Date(e.witnessed_at).toISOString() : null,
    idempotencyKey: e.idempotency_key,
    createdAt: new Date(e.created_at).toISOString(),
  };
}
