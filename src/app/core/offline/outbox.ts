import { HttpClient } from '@angular/common/http';
import { computed, DestroyRef, effect, inject, Injectable, InjectionToken, PendingTasks, signal, untracked } from '@angular/core';
import { firstValueFrom, timeout, type Observable } from 'rxjs';
import { PHOTO_FIELD, type PhotoView } from '@setwright/contracts/photos';
import { RECORD_STATUS_LABELS, type RecordDetail, type RecordState, type StepEntryView } from '@setwright/contracts/records';
import { toProblem, type Problem } from '../problem';
import { ownErrors, Session } from '../session';
import { Connection } from './connection';
import { OfflineDb } from './offline-db';
import {
  photoIdsIn,
  recordKey,
  withServerPhotoIds,
  type ConflictReason,
  type EntryItem,
  type OutboxItem,
  type PhotoItem,
  type RecordCopy,
  type StartItem,
} from './outbox-items';

/**
 * How long to wait before trying again after a send did not get through (doubling from the
 * first, up to the most), and how long one request may take before it counts as lost: a
 * tablet walking out of Wi-Fi range can leave a request hanging, and the queue must not hang with it.
 */
export interface OutboxTiming {
  firstRetryMs: number;
  maxRetryMs: number;
  requestTimeoutMs: number;
  photoTimeoutMs: number;
}
export const OUTBOX_TIMING = new InjectionToken<OutboxTiming>('outbox retry timing', {
  providedIn: 'root',
  factory: () => ({ firstRetryMs: 2000, maxRetryMs: 60_000, requestTimeoutMs: 20_000, photoTimeoutMs: 120_000 }),
});

/** The delay before the n-th retry (n from 1): first, 2 × first, 4 × first … never more than max. */
export function retryDelay(n: number, timing: Pick<OutboxTiming, 'firstRetryMs' | 'maxRetryMs'>): number {
  return Math.min(timing.maxRetryMs, timing.firstRetryMs * 2 ** Math.max(0, n - 1));
}

type Step = 'next' | 'stop';
type Call<T> = { ok: true; value: T } | { ok: false; problem: Problem };

/** A send that may work later as it stands: no connection, the server busy or down. */
const passing = (p: Problem) => p.status === 0 || p.status === 408 || p.status === 429 || p.status >= 500;
const isOpen = (status: string) => status === 'underway' || status === 'returned';
const latestAttempt = (entries: readonly StepEntryView[], stepId: string) => entries.filter((e) => e.stepId === stepId).reduce((n, e) => Math.max(n, e.attempt), 0);
const now = () => new Date().toISOString();
/** The queue's calls skip the service worker: it has nothing to add to them, and it costs a hop each. */
const direct = () => ({ context: ownErrors(), headers: { 'ngsw-bypass': 'true' } });

/**
 * The queue of work done on this tablet that has not reached the server yet: records started,
 * photos taken and steps saved while the workshop Wi-Fi was down.
 *
 * Items go to the server strictly in the order they were kept (photos before the entries that
 * refer to them), each entry with its idempotency key, so a send repeated after a lost answer
 * is recognised by the server and nothing is stored twice. It drains by itself when the
 * browser says the network is back, and otherwise retries with a doubling delay.
 *
 * What the server will not take as it stands becomes a conflict, never a silent overwrite or
 * loss: the person keeps the device copy for reference, discards it, or sends it again as a new
 * attempt when the record is open again.
 */
@Injectable({ providedIn: 'root' })
export class Outbox {
  private readonly http = inject(HttpClient);
  private readonly db = inject(OfflineDb);
  private readonly session = inject(Session);
  private readonly connection = inject(Connection);
  private readonly timing = inject(OUTBOX_TIMING);
  private readonly tasks = inject(PendingTasks);

  private readonly all = signal<readonly OutboxItem[]>([]);
  private readonly photoIds = signal<ReadonlyMap<string, string>>(new Map());
  private readonly deliveredByRecord = signal<ReadonlyMap<string, readonly StepEntryView[]>>(new Map());
  private userId: string | null = null;
  private failures = 0;
  private timer: ReturnType<typeof setTimeout> | undefined;
  private running: Promise<void> | null = null;
  /** Something was kept while a pass was under way: go round again. */
  private again = false;

  /** This person's items, oldest first. */
  readonly items = this.all.asReadonly();
  /** How many items wait on this device to be sent. */
  readonly waiting = computed(() => this.all().filter((i) => i.state === 'waiting').length);
  /** Items the server would not take as they stand: the person decides. */
  readonly conflicts = computed(() => this.all().filter((i) => i.state === 'conflict'));
  readonly draining = signal(false);
  /** The session ended while items wait: they go once the person signs in again. */
  readonly signInNeeded = signal(false);
  /** The delay before the next automatic try, while one is planned (ms). */
  readonly nextTryIn = signal<number | null>(null);
  /** Bumped after each drain that delivered something, with the records it touched. */
  readonly settled = signal<{ count: number; records: ReadonlySet<string> }>({ count: 0, records: new Set() });
  /** Whose items are loaded from the device (null while none are). */
  readonly loadedFor = signal<string | null>(null);

  constructor() {
    effect(() => {
      const user = this.session.user();
      untracked(() => void this.switchTo(user?.id ?? null));
    });
    const stop = inject(Connection).whenBack(() => {
      this.failures = 0;
      void this.drain();
    });
    inject(DestroyRef).onDestroy(() => {
      stop();
      clearTimeout(this.timer);
    });
  }

  /** The tablet can keep things for this person (IndexedDB there, someone signed in). */
  canKeep(): boolean {
    return this.db.available && !!this.session.user();
  }

  /** Items of one record (conflicts and kept copies included), oldest first. */
  forRecord(recordId: string): OutboxItem[] {
    return this.all().filter((i) => i.recordId === recordId);
  }

  /** Entries of a record the server took in this session, for pages showing an older copy. */
  deliveredFor(recordId: string): readonly StepEntryView[] {
    return this.deliveredByRecord().get(recordId) ?? [];
  }

  /** A record started on this tablet whose start has not reached the server. */
  isLocalOnly(recordId: string): boolean {
    return this.all().some((i) => i.kind === 'start' && i.recordId === recordId && i.state !== 'delivered');
  }

  /**
   * Whether a step for this record must go through the queue rather than straight to the
   * server: no connection, earlier items of the record still waiting (order), or values that
   * refer to photos not yet uploaded.
   */
  mustQueue(recordId: string, values: Record<string, unknown>): boolean {
    if (!this.connection.online()) return true;
    if (this.all().some((i) => i.recordId === recordId && (i.state === 'waiting' || i.state === 'conflict'))) return true;
    const mapped = withServerPhotoIds(values, this.photoIds());
    return photoIdsIn(mapped).some((id) => this.localPhoto(id));
  }

  // ---- photos ----

  /** A photo kept on the device under a local id, not yet uploaded. */
  localPhoto(id: string): PhotoItem | undefined {
    return this.all().find((i): i is PhotoItem => i.kind === 'photo' && i.localId === id && i.state !== 'delivered');
  }

  /** The server's id for a photo first kept on the device, once it is uploaded. */
  serverPhotoId(localId: string): string | undefined {
    return this.photoIds().get(localId);
  }

  /** The values with every uploaded local photo id swapped for the server's. */
  withServerPhotoIds<T extends Record<string, unknown>>(values: T): T {
    return withServerPhotoIds(values, this.photoIds());
  }

  async keepPhoto(blob: Blob, fileName: string): Promise<string> {
    const userId = this.requireUser();
    const localId = crypto.randomUUID();
    const item: PhotoItem = { kind: 'photo', userId, recordId: null, createdAt: now(), state: 'waiting', tries: 0, problem: null, localId, blob, fileName, serverId: null };
    await this.keep(item);
    return localId;
  }

  /**
   * Forget a photo kept on the device (removed or retaken before it was sent). A photo that a
   * kept step still refers to stays, so the step loses nothing; returns whether it went.
   */
  async discardPhoto(localId: string): Promise<boolean> {
    const photo = this.localPhoto(localId);
    if (!photo) return false;
    const used = this.all().some((i) => i.kind === 'entry' && i.state !== 'delivered' && photoIdsIn(i.request.values).includes(localId));
    if (used) return false;
    await this.db.remove([photo.seq!]);
    this.all.update((all) => all.filter((i) => i.seq !== photo.seq));
    return true;
  }

  // ---- keeping ----

  /** Keep a saved step on the device; it goes to the server in its turn, with its idempotency key. */
  async keepEntry(recordId: string, request: EntryItem['request'], preview: EntryItem['preview']): Promise<EntryItem> {
    const userId = this.requireUser();
    const copy = await this.db.record(recordKey(userId, recordId));
    const known = [...(copy?.detail.entries ?? []), ...this.deliveredFor(recordId)];
    const item: EntryItem = {
      kind: 'entry',
      userId,
      recordId,
      createdAt: now(),
      state: 'waiting',
      tries: 0,
      problem: null,
      request,
      basedOn: { status: copy?.detail.status ?? 'underway', attempt: latestAttempt(known, request.stepId) },
      preview,
      delivered: null,
    };
    return this.keep(item);
  }

  /** Keep a record started offline: its copy on the device, and its start at the head of its items. */
  async keepStart(detail: RecordDetail): Promise<StartItem> {
    const userId = this.requireUser();
    const copy: RecordCopy = { key: recordKey(userId, detail.id), userId, recordId: detail.id, detail, savedAt: now(), localOnly: true };
    await this.db.putRecord(copy);
    const item: StartItem = {
      kind: 'start',
      userId,
      recordId: detail.id,
      createdAt: now(),
      state: 'waiting',
      tries: 0,
      problem: null,
      request: { id: detail.id, machineId: detail.machine.id, procedureKey: detail.procedure.key },
      procedureVersion: detail.procedure.version,
    };
    return this.keep(item);
  }

  // ---- the person's decisions on conflicts ----

  /** Keep the device copy for reference: it stays here, marked, and is never sent. */
  async keepForReference(seq: number): Promise<void> {
    const item = this.find(seq);
    if (item?.state !== 'conflict') return;
    await this.update({ ...item, state: 'kept' });
  }

  /**
   * Discard an item after the person has seen it. A record started offline goes with all its
   * items; an entry takes with it the photos only it used that were never uploaded.
   */
  async discard(seq: number): Promise<void> {
    const item = this.find(seq);
    if (!item || item.state === 'waiting' || item.state === 'delivered') return;
    let gone: OutboxItem[] = [item];
    if (item.kind === 'start') {
      gone = this.all().filter((i) => i.recordId === item.recordId || (i.kind === 'photo' && this.onlyUsedBy(i, item.recordId)));
      await this.db.removeRecord(recordKey(item.userId, item.recordId));
    } else if (item.kind === 'entry') {
      const photos = photoIdsIn(item.request.values);
      gone.push(...this.all().filter((i): i is PhotoItem => i.kind === 'photo' && i.state !== 'delivered' && photos.includes(i.localId) && this.onlyUsedBy(i, item.recordId, item.seq)));
    }
    const seqs = gone.map((i) => i.seq!);
    await this.db.remove(seqs);
    this.all.update((all) => all.filter((i) => !seqs.includes(i.seq!)));
  }

  /**
   * Send an entry again as a new attempt, once the record is open again (underway or returned).
   * It keeps its idempotency key: the server never stored it, and if it somehow did, it is not
   * stored twice. Returns a reason when the record is not open.
   */
  async sendAgain(seq: number): Promise<string | null> {
    const item = this.find(seq);
    if (item?.kind !== 'entry' || (item.state !== 'conflict' && item.state !== 'kept')) return null;
    // Only its state and entries are needed here, not the procedure's body.
    const r = await this.call(this.http.get<RecordState>(`/api/records/${item.recordId}`, { ...direct(), params: { without: 'procedure' } }));
    if (!r.ok) return r.problem.status === 0 ? 'There is no connection to the server. Try again when the Wi-Fi is back.' : (r.problem.detail ?? r.problem.title);
    if (!isOpen(r.value.status)) return `The record is ${RECORD_STATUS_LABELS[r.value.status].toLowerCase()}, so it takes no more entries.`;
    const again = (i: EntryItem): EntryItem => ({ ...i, state: 'waiting', problem: null, basedOn: { status: r.value.status, attempt: latestAttempt(r.value.entries, i.request.stepId) } });
    const held = this.all().filter((i): i is EntryItem => i.kind === 'entry' && i.recordId === item.recordId && i.state === 'conflict' && i.problem?.reason === 'held');
    await this.updateAll([again(item), ...held.map(again)]);
    void this.drain();
    return null;
  }

  // ---- draining ----

  /**
   * Send what waits, in order. A call during a pass joins it (and the pass goes round again for
   * anything kept meanwhile); other tabs wait their turn.
   */
  drain(): Promise<void> {
    if (this.running) {
      this.again = true;
      return this.running;
    }
    this.running = (async () => {
      let stopped = false;
      do {
        this.again = false;
        // Something unforeseen (a storage error, say) must not stop the queue for good.
        stopped = await this.exclusive(() => this.pass()).catch(() => {
          this.draining.set(false);
          this.retryLater();
          return true;
        });
      } while (this.again && !stopped);
    })().finally(() => (this.running = null));
    return this.running;
  }

  /** One pass through the queue; true when it stopped early (a retry is planned). */
  private async pass(): Promise<boolean> {
    const userId = this.session.user()?.id;
    // No network at all: the browser's online event starts the next pass.
    if (!userId || !this.db.available || !this.connection.networkUp()) return false;
    clearTimeout(this.timer);
    this.nextTryIn.set(null);
    // Fresh from the database: another tab may have sent or kept something meanwhile.
    const items = await this.db.items(userId);
    if (this.userId !== userId) return false;
    this.all.set(items);
    if (!items.some((i) => i.state === 'waiting' || i.state === 'delivered')) {
      this.failures = 0;
      return false;
    }
    this.draining.set(true);
    const records = new Map<string, RecordDetail | Problem>();
    let stopped = false;
    try {
      for (const { seq } of items) {
        const item = this.find(seq!);
        if (item?.state !== 'waiting') continue;
        const step = await this.send(item, records);
        if (step === 'stop') {
          stopped = true;
          break;
        }
      }
    } finally {
      await this.settle(userId, records);
      this.draining.set(false);
    }
    if (stopped) this.retryLater();
    else this.failures = 0;
    return stopped;
  }

  private send(item: OutboxItem, records: Map<string, RecordDetail | Problem>): Promise<Step> {
    switch (item.kind) {
      case 'start':
        return this.sendStart(item);
      case 'photo':
        return this.sendPhoto(item);
      case 'entry':
        return this.sendEntry(item, records);
    }
  }

  private async sendStart(item: StartItem): Promise<Step> {
    const r = await this.call(this.http.post<RecordDetail>('/api/records', item.request, direct()));
    if (!r.ok) {
      if (this.stops(r.problem)) return this.failed(item);
      await this.conflict(item, 'refused', `The server did not take this record: ${r.problem.detail ?? r.problem.title}`);
      await this.holdRest(item.recordId, item.seq!, 'It waits on the record, which the server did not take.');
      return 'next';
    }
    const detail = r.value;
    await this.db.putRecord({ key: recordKey(item.userId, detail.id), userId: item.userId, recordId: detail.id, detail, savedAt: now(), localOnly: false });
    await this.db.remove([item.seq!]);
    this.all.update((all) => all.filter((i) => i.seq !== item.seq));
    if (detail.procedure.version !== item.procedureVersion) {
      const detailText = `This record was started on the tablet with version ${item.procedureVersion} of the procedure; the server pinned version ${detail.procedure.version}, approved meanwhile. Check this step against the new version.`;
      const entries = this.all().filter((i): i is EntryItem => i.kind === 'entry' && i.recordId === detail.id && i.state === 'waiting');
      await this.updateAll(entries.map((e) => ({ ...e, state: 'conflict', problem: { reason: 'procedure-changed', detail: detailText, at: now() } })));
    }
    return 'next';
  }

  private async sendPhoto(item: PhotoItem): Promise<Step> {
    const form = new FormData();
    form.append(PHOTO_FIELD, item.blob, item.fileName);
    const r = await this.call(this.http.post<PhotoView>('/api/photos', form, direct()), this.timing.photoTimeoutMs);
    if (!r.ok) {
      if (this.stops(r.problem)) return this.failed(item);
      await this.conflict(item, 'refused', `The server would not take this photo: ${r.problem.detail ?? r.problem.title}`);
      return 'next';
    }
    await this.update({ ...item, state: 'delivered', serverId: r.value.id, problem: null });
    this.photoIds.update((m) => new Map(m).set(item.localId, r.value.id));
    return 'next';
  }

  private async sendEntry(item: EntryItem, records: Map<string, RecordDetail | Problem>): Promise<Step> {
    // What the server holds now, once a pass, to notice what changed while the tablet was away.
    let server = records.get(item.recordId);
    if (!server) {
      const r = await this.call(this.http.get<RecordDetail>(`/api/records/${item.recordId}`, direct()));
      if (!r.ok && this.stops(r.problem)) return this.failed(item);
      server = r.ok ? r.value : r.problem;
      records.set(item.recordId, server);
    }
    if (!('entries' in server)) {
      await this.conflict(item, 'missing', `The record could not be found on the server: ${server.detail ?? server.title}`);
      return 'next';
    }
    const already = server.entries.find((e) => e.idempotencyKey === item.request.idempotencyKey);
    if (already) {
      await this.delivered(item, already);
      return 'next';
    }
    if (!isOpen(server.status)) {
      await this.conflict(item, 'closed', `While this tablet was offline the record became ${RECORD_STATUS_LABELS[server.status].toLowerCase()}, so it takes no more entries.`);
      return 'next';
    }
    if (server.status === 'returned' && item.basedOn.status !== 'returned') {
      await this.conflict(item, 'sent-back', 'While this tablet was offline the record was sent back for corrections. Read why, then send this step again as a new attempt or discard it.');
      return 'next';
    }
    const ours = new Set(this.all().flatMap((i) => (i.kind === 'entry' ? [i.request.idempotencyKey] : [])));
    const elsewhere = server.entries.filter((e) => e.stepId === item.request.stepId && e.attempt > item.basedOn.attempt && !ours.has(e.idempotencyKey));
    if (elsewhere.length) {
      const by = elsewhere.at(-1)!.enteredBy.displayName;
      await this.conflict(item, 'changed', `This step was saved from another device${by ? ` by ${by}` : ''} while this tablet was offline.`);
      return 'next';
    }
    const values = this.withServerPhotoIds(item.request.values);
    const unsent = photoIdsIn(values).filter((id) => this.all().some((i) => i.kind === 'photo' && i.localId === id));
    if (unsent.length) {
      await this.conflict(item, 'held', 'A photo in this step has not been uploaded, so the step waits for it.');
      return 'next';
    }
    const r = await this.call(this.http.post<StepEntryView>(`/api/records/${item.recordId}/entries`, { ...item.request, values }, direct()));
    if (!r.ok) {
      if (this.stops(r.problem)) return this.failed(item);
      if (r.problem.status === 409) {
        await this.conflict(item, 'closed', r.problem.detail ?? r.problem.title);
      } else if (r.problem.status === 403 || r.problem.status === 404) {
        await this.conflict(item, 'missing', r.problem.detail ?? r.problem.title);
      } else {
        const fields = (r.problem.errors ?? []).map((e) => e.detail).join(' ');
        await this.conflict(item, 'refused', [r.problem.detail ?? r.problem.title, fields].filter(Boolean).join(' '));
      }
      return 'next';
    }
    server.entries = [...server.entries, r.value];
    if (server.status === 'returned') server.status = 'underway';
    await this.delivered(item, r.value);
    return 'next';
  }

  /** Bring the record copies up to date with what was delivered, and drop the delivered items. */
  private async settle(userId: string, records: Map<string, RecordDetail | Problem>): Promise<void> {
    const delivered = this.all().filter((i) => i.state === 'delivered');
    const entries = delivered.filter((i): i is EntryItem => i.kind === 'entry');
    const stillNeeded = new Set(this.all().flatMap((i) => (i.kind === 'entry' && i.state !== 'delivered' ? photoIdsIn(i.request.values) : [])));
    const photos = delivered.filter((i): i is PhotoItem => i.kind === 'photo' && !stillNeeded.has(i.localId));
    if (!entries.length && !photos.length) return;
    const copies: RecordCopy[] = [];
    for (const recordId of new Set(entries.map((e) => e.recordId))) {
      const copy = await this.db.record(recordKey(userId, recordId));
      const server = records.get(recordId);
      const detail = server && 'entries' in server ? server : copy?.detail;
      if (!detail) continue;
      const keys = new Set(detail.entries.map((e) => e.idempotencyKey));
      const added = entries.filter((e) => e.recordId === recordId && e.delivered && !keys.has(e.delivered.idempotencyKey)).map((e) => e.delivered!);
      copies.push({ key: recordKey(userId, recordId), userId, recordId, detail: { ...detail, entries: [...detail.entries, ...added] }, savedAt: now(), localOnly: false });
    }
    // A step kept after one of ours for the same step is based on it: once ours is settled and
    // gone from the queue, the later one must not take it for a change made elsewhere.
    const rebased: EntryItem[] = [];
    for (const item of this.all()) {
      if (item.kind !== 'entry' || item.state === 'delivered') continue;
      const earlier = entries.filter((e) => e.recordId === item.recordId && e.request.stepId === item.request.stepId && e.seq! < item.seq! && e.delivered);
      const top = Math.max(item.basedOn.attempt, ...earlier.map((e) => e.delivered!.attempt));
      if (top > item.basedOn.attempt) rebased.push({ ...item, basedOn: { ...item.basedOn, attempt: top } });
    }
    const seqs = [...entries, ...photos].map((i) => i.seq!);
    await this.db.settle(copies, seqs, rebased);
    const bySeq = new Map(rebased.map((i) => [i.seq!, i]));
    this.all.update((all) => all.filter((i) => !seqs.includes(i.seq!)).map((i) => bySeq.get(i.seq!) ?? i));
    if (entries.length) {
      const touched = new Set(entries.map((e) => e.recordId));
      this.deliveredByRecord.update((m) => {
        const next = new Map(m);
        for (const e of entries) if (e.delivered) next.set(e.recordId, [...(next.get(e.recordId) ?? []), e.delivered]);
        return next;
      });
      this.settled.update((s) => ({ count: s.count + 1, records: touched }));
    }
  }

  // ---- helpers ----

  private async keep<T extends OutboxItem>(item: T): Promise<T> {
    const done = this.tasks.add();
    try {
      const kept = await this.db.add(item);
      this.all.update((all) => [...all, kept]);
      // Sent now if the server is there; with a network but no server, tried again later by itself.
      if (this.connection.online()) void this.drain();
      else if (this.connection.networkUp() && this.nextTryIn() === null) this.retryLater();
      return kept;
    } finally {
      done();
    }
  }

  private async switchTo(userId: string | null) {
    if (userId === this.userId) return;
    this.userId = userId;
    clearTimeout(this.timer);
    this.failures = 0;
    this.all.set([]);
    this.photoIds.set(new Map());
    this.deliveredByRecord.set(new Map());
    this.signInNeeded.set(false);
    this.loadedFor.set(null);
    if (!userId || !this.db.available) return;
    const done = this.tasks.add();
    try {
      const items = await this.db.items(userId);
      if (this.userId !== userId) return;
      this.all.set(items);
      this.loadedFor.set(userId);
      this.photoIds.set(new Map(items.flatMap((i) => (i.kind === 'photo' && i.serverId ? [[i.localId, i.serverId] as const] : []))));
    } finally {
      done();
    }
    if (this.all().some((i) => i.state === 'waiting' || i.state === 'delivered')) void this.drain();
  }

  private async call<T>(request: Observable<T>, ms = this.timing.requestTimeoutMs): Promise<Call<T>> {
    try {
      const value = await firstValueFrom(request.pipe(timeout(ms)));
      this.connection.reachedServer(true);
      this.signInNeeded.set(false);
      return { ok: true, value };
    } catch (err) {
      const problem = toProblem(err);
      this.connection.reachedServer(problem.status !== 0);
      if (problem.status === 401) this.signInNeeded.set(true);
      return { ok: false, problem };
    }
  }

  /** Problems that stop the whole pass (and keep the order): try again later. */
  private stops(p: Problem): boolean {
    return passing(p) || p.status === 401;
  }

  private async failed(item: OutboxItem): Promise<Step> {
    await this.update({ ...item, tries: item.tries + 1 });
    return 'stop';
  }

  private retryLater() {
    this.failures += 1;
    const delay = retryDelay(this.failures, this.timing);
    this.nextTryIn.set(delay);
    clearTimeout(this.timer);
    this.timer = setTimeout(() => void this.drain(), delay);
  }

  /**
   * Marked in memory only, until the pass settles: if the page goes first, the item is still
   * waiting on the device, and the next pass finds it on the server by its key (the record
   * check), or the server answers the repeated key with the entry it stored. Never twice.
   */
  private async delivered(item: EntryItem, entry: StepEntryView) {
    const done: EntryItem = { ...item, state: 'delivered', delivered: entry, problem: null };
    this.all.update((all) => all.map((i) => (i.seq === item.seq ? done : i)));
  }

  private async conflict(item: OutboxItem, reason: ConflictReason, detail: string) {
    await this.update({ ...item, state: 'conflict', problem: { reason, detail, at: now() } } as OutboxItem);
  }

  /** Later waiting items of a record wait on an earlier one in conflict. */
  private async holdRest(recordId: string, afterSeq: number, detail: string) {
    const rest = this.all().filter((i) => i.recordId === recordId && i.seq! > afterSeq && i.state === 'waiting');
    await this.updateAll(rest.map((i) => ({ ...i, state: 'conflict', problem: { reason: 'held', detail, at: now() } }) as OutboxItem));
  }

  /** A photo that no entry outside this record (or outside this one entry) refers to. */
  private onlyUsedBy(photo: PhotoItem, recordId: string, entrySeq?: number): boolean {
    return !this.all().some(
      (i) => i.kind === 'entry' && i.state !== 'delivered' && photoIdsIn(i.request.values).includes(photo.localId) && (entrySeq !== undefined ? i.seq !== entrySeq : i.recordId !== recordId),
    );
  }

  private find(seq: number): OutboxItem | undefined {
    return this.all().find((i) => i.seq === seq);
  }

  private async update(item: OutboxItem) {
    await this.db.put(item);
    this.all.update((all) => all.map((i) => (i.seq === item.seq ? item : i)));
  }

  private async updateAll(items: readonly OutboxItem[]) {
    if (!items.length) return;
    await this.db.putAll(items);
    const bySeq = new Map(items.map((i) => [i.seq!, i]));
    this.all.update((all) => all.map((i) => bySeq.get(i.seq!) ?? i));
  }

  private requireUser(): string {
    const id = this.session.user()?.id;
    if (!id || !this.db.available) throw new Error('Nothing can be kept on this device: nobody is signed in, or the browser keeps no data.');
    return id;
  }

  /** One pass at a time across the tabs of this browser (Web Locks), so two tabs never send the same photo. */
  private exclusive<T>(fn: () => Promise<T>): Promise<T> {
    const locks = typeof navigator !== 'undefined' ? navigator.locks : undefined;
    return locks ? (locks.request('setwright-outbox', () => fn()) as Promise<T>) : fn();
  }
}
