import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { ProcedureVersionSummary } from '@setwright/contracts/procedures';
import type { RecordDetail, RecordSummary, StepEntryRequest, StepEntryView } from '@setwright/contracts/records';
import { ownErrors } from '../../core/session';

/** The set-up record calls the runner and the lists make. */
@Injectable({ providedIn: 'root' })
export class RecordApi {
  private readonly http = inject(HttpClient);

  procedures(machineKind: string) {
    return this.http.get<ProcedureVersionSummary[]>('/api/procedures', { params: { machineKind } });
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

  start(machineId: string, procedureKey: string): Promise<RecordDetail> {
    return firstValueFrom(this.http.post<RecordDetail>('/api/records', { id: crypto.randomUUID(), machineId, procedureKey }));
  }

  /** Save a step; field problems come back to the caller rather than as a snackbar. */
  saveStep(recordId: string, body: StepEntryRequest): Promise<StepEntryView> {
    return firstValueFrom(this.http.post<StepEntryView>(`/api/records/${recordId}/entries`, body, { context: ownErrors() }));
  }

  /** Finish and sign as performed (the password is the signature). */
  finish(recordId: string, acceptFailed: boolean, password: string): Promise<RecordDetail> {
    return firstValueFrom(this.http.post<RecordDetail>(`/api/records/${recordId}/finish`, { acceptFailed, password }, { context: ownErrors() }));
  }
}
