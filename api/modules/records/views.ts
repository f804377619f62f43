import type { RecordDetail, RecordSummary, StepEntryView } from '../../contracts/records';
import type { Procedure } from '../../../procedures/schema';
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

export function recordDetail(r: SetupRecord, entries: StepEntry[], body: Procedure): RecordDetail {
  return {
    ...recordSummary(r),
    procedureBody: body,
    machineSpec: r.machineSpec,
    entries: entries.map(entryView),
    voidReason: r.voidReason,
  };
}
