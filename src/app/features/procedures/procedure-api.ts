import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { ProcedureVersionDetail, ProcedureVersionSummary } from '@setwright/contracts/procedures';
import type { Procedure, ProcedureSource } from '@setwright/procedures/schema';
import { ownErrors } from '../../core/session';

/** The procedure library's calls: versions, drafts, saving, approving. */
@Injectable({ providedIn: 'root' })
export class ProcedureApi {
  private readonly http = inject(HttpClient);

  /** Every version of every procedure (the library). */
  library() {
    return this.http.get<ProcedureVersionSummary[]>('/api/procedures', { params: { all: '1' } });
  }

  versions(key: string) {
    return this.http.get<ProcedureVersionSummary[]>(`/api/procedures/${encodeURIComponent(key)}/versions`);
  }

  get(key: string, version: number) {
    return this.http.get<ProcedureVersionDetail>(this.path(key, version));
  }

  /** Copy the approved version (or the one named) into a new draft; a refusal comes back to the page that asked. */
  startDraft(key: string, from?: number): Promise<ProcedureVersionDetail> {
    return firstValueFrom(this.http.post<ProcedureVersionDetail>(`/api/procedures/${encodeURIComponent(key)}/drafts`, from ? { from } : {}, { context: ownErrors() }));
  }

  /** Save a draft's whole body; field problems come back to the editor rather than as a snackbar. */
  save(key: string, version: number, body: ProcedureSource | Procedure): Promise<ProcedureVersionDetail> {
    return firstValueFrom(this.http.put<ProcedureVersionDetail>(this.path(key, version), body, { context: ownErrors() }));
  }

  remove(key: string, version: number): Promise<unknown> {
    return firstValueFrom(this.http.delete(this.path(key, version), { context: ownErrors() }));
  }

  approve(key: string, version: number): Promise<ProcedureVersionDetail> {
    return firstValueFrom(this.http.post<ProcedureVersionDetail>(`${this.path(key, version)}/approve`, {}, { context: ownErrors() }));
  }

  private path(key: string, version: number) {
    return `/api/procedures/${encodeURIComponent(key)}/versions/${version}`;
  }
}
