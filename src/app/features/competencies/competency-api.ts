import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { AuthorisationView, CompetencyMatrix } from '@setwright/contracts/competencies';
import { ownErrors } from '../../core/session';

export interface GrantBody {
  personId: string;
  procedureKey: string;
  expiresOn: string;
  note?: string;
  password: string;
}

/** Calls for the competency matrix, its CSV export, and authorisations. */
@Injectable({ providedIn: 'root' })
export class CompetencyApi {
  private readonly http = inject(HttpClient);

  matrix() {
    return this.http.get<CompetencyMatrix>('/api/competencies/matrix');
  }
  history(personId: string, procedureKey: string) {
    return this.http.get<AuthorisationView[]>('/api/competencies/authorisations', { params: { personId, procedureKey } });
  }
  csv(): Promise<Blob> {
    return firstValueFrom(this.http.get('/api/competencies/matrix.csv', { responseType: 'blob' }));
  }
  grant(body: GrantBody): Promise<AuthorisationView> {
    return firstValueFrom(this.http.post<AuthorisationView>('/api/competencies/authorisations', body, { context: ownErrors() }));
  }
  revoke(id: string, reason: string): Promise<AuthorisationView> {
    return firstValueFrom(this.http.post<AuthorisationView>(`/api/competencies/authorisations/${id}/revoke`, { reason }, { context: ownErrors() }));
  }
}
