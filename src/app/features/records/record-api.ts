import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { MatSnackBar } from '@angular/material/snack-bar';
import { catchError, defer, firstValueFrom, from, map, tap, type Observable } from 'rxjs';
import type { MachineSummary } from '@setwright/contracts/machines';
import type { ProcedureVersionDetail, ProcedureVersionSummary } from '@setwright/contracts/procedures';
import type { RecordDetail, RecordSummary, StartRecordRequest, StepEntryRequest, StepEntryView } from '@setwright/contracts/records';
import { Connection } from '../../core/offline/connection';
import { DeviceCopies } from '../../core/offline/device-copies';
import { Outbox } from '../../core/offline/outbox';
import { toProblem, type Problem } from '../../core/problem';
import { ownErrors, Session } from '../../core/session';

/** A record as the runner opens it: from the server, or the copy kept on this tablet. */
export type OpenedRecord = RecordDetail & {
  /** When the tablet's copy was saved, if this is the copy (no connection); null when fresh from the server. */
  copySavedAt: string | null;
};

const problem = (title: string, detail: string): Problem => ({ type: '/problems/offline', title, status: 0, detail });

/** The set-up record calls the runner and the lists make. */
@Injectable({ providedIn: 'root' })
export class RecordApi {
  private readonly http = inject(HttpClient);
  private readonly connection = inject(Connection);
  private readonly copies = inject(DeviceCopies);
  private readonly outbox = inject(Outbox);
  private readonly session = inject(Session);
  private readonly snackBar = inject(MatSnackBar);

  /** The approved procedures for a kind of machine; for people who run them, each is also kept on the tablet for starting offline. */
  procedures(machineKind: string) {
    return this.http
      .get<ProcedureVersionSummary[]>('/api/procedures', { params: { machineKind } })
      .pipe(tap((list) => void this.keepProcedures(machineKind, list)));
  }

  list(filter: { status?: string; machineId?: string; mine?: boolean } = {}) {
    const params: Record<string, string> = {};
    if (filter.status) params['status'] = filter.status;
    if (filter.machineId) params['machineId'] = filter.machineId;
    if (filter.mine) params['mine'] = '1';
    return this.http.get<RecordSummary[]>('/api/records', { params });
  }

  get(id: string) {
    return this.http.get<RecordDetail>(`/api/records/${id}`);
  }

  /**
   * The record for the runner: from the server, keeping a copy on the tablet; or, without a
   * connection (or for a record started offline and not yet sent), the tablet's copy.
   */
  open(id: string): Observable<OpenedRecord> {
    return defer(() => {
      if (this.outbox.isLocalOnly(id) || !this.connection.networkUp()) return from(this.deviceCopy(id, null));
      return this.http.get<RecordDetail>(`/api/records/${id}`).pipe(
        tap((detail) => void this.copies.saveRecord(detail)),
        map((detail): OpenedRecord => ({ ...detail, copySavedAt: null })),
        catchError((err: unknown) => from(this.deviceCopy(id, err))),
      );
    });
  }

  /**
   * Start a record with a client-made id, so a repeat is the same record. Without a connection
   * it starts on the tablet from the machine and procedure kept here, and the start waits in
   * the queue with everything done on it.
   */
  async start(machineId: string, procedureKey: string): Promise<RecordDetail> {
    const request = { id: crypto.randomUUID(), machineId, procedureKey } satisfies StartRecordRequest;
    if (this.connection.online()) {
      try {
        return await firstValueFrom(this.http.post<RecordDetail>('/api/records', request, { context: ownErrors() }));
      } catch (err) {
        const p = toProblem(err);
        if (p.status !== 0 || !this.outbox.canKeep()) throw this.say(p);
      }
    }
    try {
      return await this.startOnDevice(request);
    } catch (err) {
      throw this.say(toProblem(err));
    }
  }

  /** Save a step; field problems come back to the caller rather than as a snackbar. */
  saveStep(recordId: string, body: StepEntryRequest): Promise<StepEntryView> {
    return firstValueFrom(this.http.post<StepEntryView>(`/api/records/${recordId}/entries`, body, { context: ownErrors() }));
  }

  /** Finish and sign as performed (the password is the signature). */
  finish(recordId: string, acceptFailed: boolean, password: string): Promise<RecordDetail> {
    return firstValueFrom(this.http.post<RecordDetail>(`/api/records/${recordId}/finish`, { acceptFailed, password }, { context: ownErrors() }));
  }

  private async deviceCopy(id: string, err: unknown): Promise<OpenedRecord> {
    const p = err === null ? null : toProblem(err);
    const usable = p === null || p.status === 0 || (p.status === 404 && this.outbox.isLocalOnly(id));
    const copy = usable ? await this.copies.record(id) : undefined;
    if (copy) return { ...copy.detail, copySavedAt: copy.localOnly ? null : copy.savedAt };
    throw p ?? problem('No connection', 'This record is not kept on this tablet, and the server cannot be reached. Open it again when the Wi-Fi is back.');
  }

  private async startOnDevice(request: StartRecordRequest & { id: string }): Promise<RecordDetail> {
    const user = this.session.user();
    if (!user || !this.outbox.canKeep()) throw problem('No connection', 'This tablet cannot keep records, so a record can only be started with a connection.');
    // The machine comes from the service worker's copy of the machine page, when it has one.
    const machine = await firstValueFrom(this.http.get<MachineSummary>(`/api/machines/${request.machineId}`, { context: ownErrors() })).catch(() => null);
    if (!machine) {
      throw problem('No connection', 'This machine has not been opened on this tablet with a connection, so a record cannot be started here offline.');
    }
    const kept = await this.copies.procedure(machine.kind, request.procedureKey);
    if (!kept) {
      throw problem('No connection', 'This procedure is not kept on this tablet yet. Open the machine once with a connection, then you can start it offline.');
    }
    const v = kept.version;
    const detail: RecordDetail = {
      id: request.id,
      status: 'underway',
      result: null,
      machine: { id: machine.id, name: machine.name, assetTag: machine.assetTag },
      procedure: { id: v.id, key: v.key, version: v.version, title: v.title },
      startedBy: { id: user.id, displayName: user.displayName },
      createdAt: new Date().toISOString(),
      finishedAt: null,
      procedureBody: v.body,
      machineSpec: machine.spec,
      entries: [],
      voidReason: null,
    };
    await this.outbox.keepStart(detail);
    return detail;
  }

  /** Keep each approved procedure's current version on the tablet (fetched again only when it changed). */
  private async keepProcedures(machineKind: string, list: readonly ProcedureVersionSummary[]) {
    if (!this.session.hasAnyRole(['trainee', 'competent_person']) || !this.outbox.canKeep()) return;
    for (const summary of list.filter((p) => p.status === 'approved')) {
      const kept = await this.copies.procedure(machineKind, summary.key);
      if (kept?.version.checksum === summary.checksum && kept.version.version === summary.version) continue;
      const url = `/api/procedures/${encodeURIComponent(summary.key)}/versions/${summary.version}`;
      const version = await firstValueFrom(this.http.get<ProcedureVersionDetail>(url, { context: ownErrors() })).catch(() => null);
      if (version) await this.copies.saveProcedure(machineKind, version);
    }
  }

  /** Show the problem the way the app's interceptor would, and hand it back to be thrown. */
  private say(p: Problem): Problem {
    this.snackBar.open(p.detail ? `${p.title}: ${p.detail}` : p.title, 'Dismiss', { duration: 8000, politeness: 'assertive' });
    return p;
  }
}
