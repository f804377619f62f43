// What the tablet keeps while the workshop Wi-Fi is down: plain data, no Angular, so the
// drain benchmark (test/bench/offline-drain.ts) writes exactly the same shapes.
import type { ProcedureVersionDetail } from '@setwright/contracts/procedures';
import type { RecordDetail, RecordStatus, StartRecordRequest, StepEntryRequest, StepEntryView } from '@setwright/contracts/records';
import type { StepEvaluation } from '@setwright/procedures/engine';

/** The IndexedDB database on the device, and its version (bump it with a new upgrade step). */
export const OFFLINE_DB = 'setwright-offline';
export const OFFLINE_DB_VERSION = 1;

/**
 * Where a kept item stands.
 * - waiting: on the device, to be sent when the connection allows;
 * - delivered: the server has it (kept a moment longer, until the record's copy is brought up to date);
 * - conflict: the server could not take it as it stands; the person decides what happens to it;
 * - kept: the person chose to keep it on the device for reference; it is never sent.
 */
export type OutboxState = 'waiting' | 'delivered' | 'conflict' | 'kept';

/** Why an item is in conflict, in our own words. */
export type ConflictReason =
  /** the record was sent back, finished, signed off or voided meanwhile (409 or seen before sending) */
  | 'closed'
  /** the record was sent back while this tablet was offline */
  | 'sent-back'
  /** the same step was saved from another device while this tablet was offline */
  | 'changed'
  /** the server refused the item as it stands (a field problem, a photo it would not take) */
  | 'refused'
  /** the record is not there any more, or is not this person's */
  | 'missing'
  /** a record started offline was pinned to a newer procedure version by the server */
  | 'procedure-changed'
  /** waits on an earlier item of the same record that is in conflict */
  | 'held';

export interface OutboxProblem {
  reason: ConflictReason;
  /** Plain words for the person at the saw. */
  detail: string;
  at: string;
}

interface ItemBase {
  /** Queue order: IndexedDB's auto-increment key. */
  seq?: number;
  /** Whose item it is: only that person's session sends it. */
  userId: string;
  /** The record it belongs to (null for a photo, which only joins a record through an entry). */
  recordId: string | null;
  createdAt: string;
  state: OutboxState;
  /** How many times a send was tried and did not get through. */
  tries: number;
  problem: OutboxProblem | null;
}

/** A record started without a connection: the POST /api/records with the tablet's own id. */
export interface StartItem extends ItemBase {
  kind: 'start';
  recordId: string;
  request: StartRecordRequest & { id: string };
  /** The procedure version the tablet used, to notice when the server pins another. */
  procedureVersion: number;
}

/** A photo taken without a connection: uploaded before any entry that refers to it. */
export interface PhotoItem extends ItemBase {
  kind: 'photo';
  recordId: null;
  /** The id the step's values carry until the upload gives the server's id. */
  localId: string;
  blob: Blob;
  fileName: string;
  /** The server's id once uploaded. */
  serverId: string | null;
}

/** A step saved without a connection: the POST /api/records/:id/entries, idempotency key and all. */
export interface EntryItem extends ItemBase {
  kind: 'entry';
  recordId: string;
  /** Never carries a witness: steps with power on need the server there and then. */
  request: Omit<StepEntryRequest, 'witness'>;
  /** What the tablet knew of the record when the step was saved, to notice changes made elsewhere. */
  basedOn: { status: RecordStatus; attempt: number };
  /** The tablet's own judgement of the step (the same maths the server uses). */
  preview: { evaluation: StepEvaluation; outcome: 'done' | 'out_of_limits' };
  /** The server's entry, once delivered. */
  delivered: StepEntryView | null;
}

export type OutboxItem = StartItem | PhotoItem | EntryItem;

/** The device copy of a record the person is running. */
export interface RecordCopy {
  /** `${userId}/${recordId}` */
  key: string;
  userId: string;
  recordId: string;
  detail: RecordDetail;
  savedAt: string;
  /** Started on this tablet and not yet on the server. */
  localOnly: boolean;
}

/** An approved procedure version kept on the device, so a record can be started offline. */
export interface ProcedureCopy {
  /** `${userId}/${machineKind}/${procedureKey}` */
  key: string;
  userId: string;
  machineKind: string;
  procedureKey: string;
  version: ProcedureVersionDetail;
  savedAt: string;
}

export const recordKey = (userId: string, recordId: string) => `${userId}/${recordId}`;
export const procedureKey = (userId: string, machineKind: string, key: string) => `${userId}/${machineKind}/${key}`;

/** Every photo id (local or stored) in a step's values. */
export function photoIdsIn(values: Record<string, unknown>): string[] {
  return Object.values(values).flatMap((v) => (Array.isArray(v) ? v.filter((x): x is string => typeof x === 'string') : []));
}

/** The values with local photo ids swapped for the server's, where known. */
export function withServerPhotoIds<T extends Record<string, unknown>>(values: T, serverIds: ReadonlyMap<string, string>): T {
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(values)) {
    out[k] = Array.isArray(v) ? v.map((x) => (typeof x === 'string' ? (serverIds.get(x) ?? x) : x)) : v;
  }
  return out as T;
}
