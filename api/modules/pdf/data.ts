import type { Readable } from 'node:stream';
import { Op } from 'sequelize';
import type { StepEvaluation } from '../../../procedures/engine';
import type { Procedure } from '../../../procedures/schema';
import type { RecordResult, RecordStatus } from '../../contracts/records';
import type { SignatureMeaning } from '../../contracts/signoff';
import type { ObjectStore } from '../../lib/object-store';
import { Machine } from '../machines/model';
import { User } from '../people/model';
import { Photo } from '../photos/model';
import { ProcedureVersion } from '../procedures/model';
import { SetupRecord, StepEntry } from '../records/model';
import { RecordAddendum, RecordReturn, Signature } from '../signoff/model';

/** A photo's stored thumbnail, ready to place on the page. */
export interface PdfPhoto {
  id: string;
  data: Buffer;
  width: number;
  height: number;
  sha256: string;
}

/** Everything one record PDF shows, gathered before any drawing starts (the renderer does no I/O). */
export interface RecordPdfData {
  workshopName: string;
  timeZone: string;
  /** Where the QR code points: the Record check page of this record. */
  checkUrl: string;
  record: {
    id: string;
    status: RecordStatus;
    result: RecordResult | null;
    createdAt: Date;
    finishedAt: Date | null;
    signedAt: Date | null;
    recordHash: string | null;
    previousHash: string | null;
    voidReason: string | null;
  };
  machine: { name: string; assetTag: string; model: string; location: string };
  procedure: { key: string; version: number; title: string; checksum: string; body: Procedure };
  startedBy: string;
  entries: {
    stepId: string;
    attempt: number;
    values: Record<string, unknown>;
    evaluation: StepEvaluation;
    outcome: 'done' | 'out_of_limits';
    correctiveNote: string | null;
    enteredBy: string;
    witnessedBy: string | null;
    witnessedAt: Date | null;
    createdAt: Date;
  }[];
  photos: Map<string, PdfPhoto>;
  signatures: { meaning: SignatureMeaning; printedName: string; signedAt: Date; stepId: string | null }[];
  returns: { returnedBy: string; reason: string; returnedAt: Date }[];
  addenda: { printedName: string; text: string; signedAt: Date; addendumHash: string }[];
}

async function readAll(stream: Readable): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream) chunks.push(Buffer.isBuffer(chunk) ? chunk : Buffer.from(chunk as Uint8Array));
  return Buffer.concat(chunks);
}

/** The bytes of a stored object; a missing one is an error (a record's photo must be there). */
export async function readObject(store: ObjectStore, key: string): Promise<Buffer> {
  const object = await store.getStream(key);
  if (!object) throw new Error(`the object store has no ${key}`);
  return readAll(object.body);
}

/** Gather a record, its procedure, entries, photo thumbnails, signatures, send-backs and addenda. */
export async function loadRecordPdfData(
  recordId: string,
  store: ObjectStore,
  settings: { workshopName: string; timeZone: string; publicUrl: string },
): Promise<RecordPdfData> {
  const r = await SetupRecord.findByPk(recordId, {
    include: [
      { model: Machine, as: 'machine' },
      { model: ProcedureVersion, as: 'procedureVersion' },
      { model: User, as: 'startedBy' },
    ],
  });
  if (!r) throw new Error(`record ${recordId} not found`);
  const [entries, signatures, returns, addenda] = await Promise.all([
    StepEntry.findAll({
      where: { recordId },
      include: [
        { model: User, as: 'enteredBy', attributes: ['id', 'displayName'] },
        { model: User, as: 'witnessedBy', attributes: ['id', 'displayName'] },
      ],
      order: [['stepId', 'ASC'], ['attempt', 'ASC']],
    }),
    Signature.findAll({ where: { recordId }, order: [['signedAt', 'ASC'], ['id', 'ASC']] }),
    RecordReturn.findAll({ where: { recordId }, order: [['returnedAt', 'ASC']] }),
    RecordAddendum.findAll({ where: { recordId }, order: [['signedAt', 'ASC'], ['id', 'ASC']] }),
  ]);
  const returnerIds = [...new Set(returns.map((x) => x.returnedById))];
  const returners = returnerIds.length
    ? new Map((await User.findAll({ where: { id: { [Op.in]: returnerIds } }, attributes: ['id', 'displayName'] })).map((u) => [u.id, u.displayName]))
    : new Map<string, string>();

  const photoIds = [...new Set(entries.flatMap((e) => Object.values(e.values).filter(Array.isArray).flat() as string[]))];
  const rows = photoIds.length ? await Photo.findAll({ where: { id: { [Op.in]: photoIds } } }) : [];
  const photos = new Map<string, PdfPhoto>();
  const thumbs = await Promise.all(rows.map((p) => readObject(store, p.thumbKey)));
  rows.forEach((p, i) => photos.set(p.id, { id: p.id, data: thumbs[i]!, width: p.thumbWidth, height: p.thumbHeight, sha256: p.thumbSha256 }));

  const pv = r.procedureVersion!;
  const m = r.machine!;
  return {
    workshopName: settings.workshopName,
    timeZone: settings.timeZone,
    checkUrl: `${settings.publicUrl.replace(/\/+$/, '')}/records/${r.id}/check`,
    record: {
      id: r.id,
      status: r.status,
      result: r.result,
      createdAt: r.createdAt,
      finishedAt: r.finishedAt,
      signedAt: r.signedAt,
      recordHash: r.recordHash,
      previousHash: r.previousHash,
      voidReason: r.voidReason,
    },
    machine: { name: m.name, assetTag: m.assetTag, model: m.model, location: m.location },
    procedure: { key: pv.key, version: pv.version, title: pv.title, checksum: pv.checksum, body: pv.body },
    startedBy: r.startedBy?.displayName ?? '',
    entries: entries.map((e) => ({
      stepId: e.stepId,
      attempt: e.attempt,
      values: e.values,
      evaluation: e.evaluation,
      outcome: e.outcome,
      correctiveNote: e.correctiveNote,
      enteredBy: e.enteredBy?.displayName ?? '',
      witnessedBy: e.witnessedBy?.displayName ?? null,
      witnessedAt: e.witnessedAt,
      createdAt: e.createdAt,
    })),
    photos,
    signatures: signatures.map((s) => ({ meaning: s.meaning, printedName: s.printedName, signedAt: s.signedAt, stepId: s.stepId })),
    returns: returns.map((x) => ({ returnedBy: returners.get(x.returnedById) ?? '', reason: x.reason, returnedAt: x.returnedAt })),
    addenda: addenda.map((a) => ({ printedName: a.printedName, text: a.text, signedAt: a.signedAt, addendumHash: a.addendumHash })),
  };
}
