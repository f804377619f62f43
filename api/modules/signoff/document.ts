import { createHash } from 'node:crypto';
import canonicalize from 'canonicalize';
import { Op, type Transaction } from 'sequelize';
import { Machine } from '../machines/model';
import { User } from '../people/model';
import { Photo } from '../photos/model';
import { ProcedureVersion } from '../procedures/model';
import { SetupRecord, StepEntry } from '../records/model';
import { RecordReturn, Signature } from './model';

/**
 * The signed record as one JSON document: the record, its entries with their computed values,
 * the hashes of its photos, its signatures and send-backs, and the previous hash in its
 * machine's chain. Its SHA-256 over RFC 8785 canonical JSON is the record hash.
 */
export interface RecordDocument {
  schema: 'setwright.record/1';
  record: {
    id: string;
    status: string;
    result: string | null;
    machine: { id: string; name: string; assetTag: string; model: string; location: string };
    machineSpec: Record<string, unknown>;
    procedure: { key: string; version: number; title: string; checksum: string };
    startedBy: { id: string; name: string };
    startedAt: string;
    finishedAt: string | null;
    signedAt: string | null;
  };
  entries: {
    id: string;
    stepId: string;
    attempt: number;
    values: Record<string, unknown>;
    computed: { id: string; label: string; value: unknown; unit: string | null; outcome: string }[];
    inputs: { id: string; outcome: string }[];
    outcome: string;
    correctiveNote: string | null;
    enteredBy: string;
    witnessedBy: string | null;
    witnessedAt: string | null;
    createdAt: string;
  }[];
  photos: { id: string; sha256: string; displaySha256: string; thumbSha256: string }[];
  signatures: { id: string; meaning: string; signerId: string; printedName: string; signedAt: string; stepId: string | null }[];
  returns: { returnedBy: string; reason: string; returnedAt: string }[];
  previousHash: string | null;
}

const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);

export async function buildRecordDocument(recordId: string, transaction?: Transaction): Promise<RecordDocument> {
  const r = await SetupRecord.findByPk(recordId, {
    transaction,
    include: [
      { model: Machine, as: 'machine' },
      { model: ProcedureVersion, as: 'procedureVersion' },
      { model: User, as: 'startedBy' },
    ],
  });
  if (!r) throw new Error(`record ${recordId} not found`);
  const entries = await StepEntry.findAll({ where: { recordId }, order: [['createdAt', 'ASC'], ['stepId', 'ASC'], ['attempt', 'ASC']], transaction });
  const photoIds = entries.flatMap((e) => Object.values(e.values).filter(Array.isArray).flat() as string[]);
  const photos = photoIds.length
    ? await Photo.findAll({ where: { id: { [Op.in]: photoIds } }, order: [['id', 'ASC']], transaction })
    : [];
  const signatures = await Signature.findAll({ where: { recordId }, order: [['signedAt', 'ASC'], ['id', 'ASC']], transaction });
  const returns = await RecordReturn.findAll({ where: { recordId }, order: [['returnedAt', 'ASC']], transaction });
  const pv = r.procedureVersion!;
  const m = r.machine!;
  return {
    schema: 'setwright.record/1',
    record: {
      id: r.id,
      status: r.status,
      result: r.result,
      // The machine as it was when the record started, so moving or renaming it later leaves the hash intact.
      machine: r.machineSnapshot ?? { id: m.id, name: m.name, assetTag: m.assetTag, model: m.model, location: m.location },
      machineSpec: r.machineSpec,
      procedure: { key: pv.key, version: pv.version, title: pv.title, checksum: pv.checksum },
      startedBy: { id: r.startedById, name: r.startedBy?.displayName ?? '' },
      startedAt: r.createdAt.toISOString(),
      finishedAt: iso(r.finishedAt),
      signedAt: iso(r.signedAt),
    },
    entries: entries.map((e) => ({
      id: e.id,
      stepId: e.stepId,
      attempt: e.attempt,
      values: e.values,
      computed: e.evaluation.computed.map((c) => ({ id: c.id, label: c.label, value: c.value, unit: c.unit ?? null, outcome: c.outcome })),
      inputs: e.evaluation.inputs.map((i) => ({ id: i.id, outcome: i.outcome })),
      outcome: e.outcome,
      correctiveNote: e.correctiveNote,
      enteredBy: e.enteredById,
      witnessedBy: e.witnessedById,
      witnessedAt: iso(e.witnessedAt),
      createdAt: e.createdAt.toISOString(),
    })),
    photos: photos.map((p) => ({ id: p.id, sha256: p.sha256, displaySha256: p.displaySha256, thumbSha256: p.thumbSha256 })),
    signatures: signatures.map((s) => ({
      id: s.id,
      meaning: s.meaning,
      signerId: s.signerId,
      printedName: s.printedName,
      signedAt: s.signedAt.toISOString(),
      stepId: s.stepId,
    })),
    returns: returns.map((x) => ({ returnedBy: x.returnedById, reason: x.reason, returnedAt: x.returnedAt.toISOString() })),
    previousHash: r.previousHash,
  };
}

/** SHA-256 (hex) of a document's RFC 8785 canonical JSON. */
export function hashDocument(doc: unknown): string {
  return createHash('sha256').update(canonicalize(doc) ?? '').digest('hex');
}
