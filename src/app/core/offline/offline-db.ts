import { inject, Injectable, InjectionToken } from '@angular/core';
import { openDB, type DBSchema, type IDBPDatabase } from 'idb';
import { OFFLINE_DB, OFFLINE_DB_VERSION, type OutboxItem, type ProcedureCopy, type RecordCopy } from './outbox-items';

/** The database name; specs give each test its own. */
export const OFFLINE_DB_NAME = new InjectionToken<string>('the offline database name', { providedIn: 'root', factory: () => OFFLINE_DB });

interface OfflineSchema extends DBSchema {
  outbox: { key: number; value: OutboxItem; indexes: { user: string } };
  records: { key: string; value: RecordCopy; indexes: { user: string } };
  procedures: { key: string; value: ProcedureCopy; indexes: { user: string } };
}

/**
 * The tablet's own store (IndexedDB through `idb`): the queue of things waiting for the server,
 * the copies of the records being run, and the approved procedures needed to start one offline.
 */
@Injectable({ providedIn: 'root' })
export class OfflineDb {
  private readonly name = inject(OFFLINE_DB_NAME);
  private opening: Promise<IDBPDatabase<OfflineSchema>> | null = null;

  /** False where the browser has no IndexedDB (or refuses it, as some private windows do). */
  readonly available = typeof indexedDB !== 'undefined';

  private db(): Promise<IDBPDatabase<OfflineSchema>> {
    this.opening ??= openDB<OfflineSchema>(this.name, OFFLINE_DB_VERSION, {
      upgrade(db, oldVersion) {
        if (oldVersion < 1) {
          db.createObjectStore('outbox', { keyPath: 'seq', autoIncrement: true }).createIndex('user', 'userId');
          db.createObjectStore('records', { keyPath: 'key' }).createIndex('user', 'userId');
          db.createObjectStore('procedures', { keyPath: 'key' }).createIndex('user', 'userId');
        }
      },
      // A newer version of the app wants the database: let it have it, and open again when needed.
      blocking: () => this.close(),
      terminated: () => (this.opening = null),
    }).catch((err: unknown) => {
      this.opening = null;
      throw err;
    });
    return this.opening;
  }

  async close(): Promise<void> {
    const opening = this.opening;
    this.opening = null;
    if (opening) (await opening.catch(() => null))?.close();
  }

  // ---- the queue ----

  /** One person's items, oldest first (seq is the order they were kept in). */
  async items(userId: string): Promise<OutboxItem[]> {
    const all = await (await this.db()).getAllFromIndex('outbox', 'user', userId);
    return all.sort((a, b) => a.seq! - b.seq!);
  }

  async item(seq: number): Promise<OutboxItem | undefined> {
    return (await this.db()).get('outbox', seq);
  }

  /** Add an item at the end of the queue; returns it with its seq. */
  async add<T extends OutboxItem>(item: T): Promise<T> {
    const copy = { ...item };
    delete copy.seq;
    const seq = await (await this.db()).add('outbox', copy);
    return { ...copy, seq };
  }

  async put(item: OutboxItem): Promise<void> {
    await (await this.db()).put('outbox', item);
  }

  async putAll(items: readonly OutboxItem[]): Promise<void> {
    if (!items.length) return;
    const tx = (await this.db()).transaction('outbox', 'readwrite');
    await Promise.all([...items.map((i) => tx.store.put(i)), tx.done]);
  }

  async remove(seqs: readonly number[]): Promise<void> {
    if (!seqs.length) return;
    const tx = (await this.db()).transaction('outbox', 'readwrite');
    await Promise.all([...seqs.map((s) => tx.store.delete(s)), tx.done]);
  }

  // ---- record copies ----

  async record(key: string): Promise<RecordCopy | undefined> {
    return (await this.db()).get('records', key);
  }

  async putRecord(copy: RecordCopy): Promise<void> {
    await (await this.db()).put('records', copy);
  }

  async records(userId: string): Promise<RecordCopy[]> {
    return (await this.db()).getAllFromIndex('records', 'user', userId);
  }

  async removeRecord(key: string): Promise<void> {
    await (await this.db()).delete('records', key);
  }

  /**
   * The copies brought up to date and the delivered items dropped, in one transaction: a reload
   * half-way never finds an entry neither in the copy nor in the queue.
   */
  async settle(copies: readonly RecordCopy[], deliveredSeqs: readonly number[], updated: readonly OutboxItem[] = []): Promise<void> {
    const tx = (await this.db()).transaction(['records', 'outbox'], 'readwrite');
    const records = tx.objectStore('records');
    const outbox = tx.objectStore('outbox');
    await Promise.all([...copies.map((c) => records.put(c)), ...deliveredSeqs.map((s) => outbox.delete(s)), ...updated.map((i) => outbox.put(i)), tx.done]);
  }

  // ---- procedures for starting offline ----

  async procedure(key: string): Promise<ProcedureCopy | undefined> {
    return (await this.db()).get('procedures', key);
  }

  async putProcedure(copy: ProcedureCopy): Promise<void> {
    await (await this.db()).put('procedures', copy);
  }
}
