import { inject, Injectable } from '@angular/core';
import type { ProcedureVersionDetail } from '@setwright/contracts/procedures';
import type { RecordDetail } from '@setwright/contracts/records';
import { Session } from '../session';
import { OfflineDb } from './offline-db';
import { procedureKey, recordKey, type ProcedureCopy, type RecordCopy } from './outbox-items';

/**
 * Copies kept on the tablet for the signed-in person: the records they run (so a reload without
 * a connection still shows the record and what was entered) and the approved procedures of the
 * machines they opened (so a record can be started without one). Never anyone else's.
 */
@Injectable({ providedIn: 'root' })
export class DeviceCopies {
  private readonly db = inject(OfflineDb);
  private readonly session = inject(Session);

  private userId(): string | null {
    return this.db.available ? (this.session.user()?.id ?? null) : null;
  }

  /** Keep the server's record, if it is this person's own (the only records they run). */
  async saveRecord(detail: RecordDetail): Promise<void> {
    const userId = this.userId();
    if (!userId || detail.startedBy.id !== userId) return;
    await this.db.putRecord({ key: recordKey(userId, detail.id), userId, recordId: detail.id, detail, savedAt: new Date().toISOString(), localOnly: false }).catch(() => undefined);
  }

  async record(recordId: string): Promise<RecordCopy | undefined> {
    const userId = this.userId();
    return userId ? this.db.record(recordKey(userId, recordId)).catch(() => undefined) : undefined;
  }

  async saveProcedure(machineKind: string, version: ProcedureVersionDetail): Promise<void> {
    const userId = this.userId();
    if (!userId) return;
    const key = procedureKey(userId, machineKind, version.key);
    await this.db.putProcedure({ key, userId, machineKind, procedureKey: version.key, version, savedAt: new Date().toISOString() }).catch(() => undefined);
  }

  async procedure(machineKind: string, key: string): Promise<ProcedureCopy | undefined> {
    const userId = this.userId();
    return userId ? this.db.procedure(procedureKey(userId, machineKind, key)).catch(() => undefined) : undefined;
  }
}
