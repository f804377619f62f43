import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { InviteRequest, PersonSummary, SetPasswordRequest, SetPasswordResponse, StandInMessage } from '@setwright/contracts/people';
import type { Role } from '@setwright/contracts/roles';
import { ownErrors } from '../../core/session';

/** Calls for the People place (workshop admins), the set-password page, and the development mailbox. */
@Injectable({ providedIn: 'root' })
export class PeopleApi {
  private readonly http = inject(HttpClient);

  list() {
    return this.http.get<PersonSummary[]>('/api/people');
  }
  /** Field problems come back to the form that sent them. */
  invite(body: InviteRequest): Promise<PersonSummary> {
    return firstValueFrom(this.http.post<PersonSummary>('/api/people', body, { context: ownErrors() }));
  }
  setRoles(id: string, roles: Role[]): Promise<PersonSummary> {
    return firstValueFrom(this.http.put<PersonSummary>(`/api/people/${id}/roles`, { roles }, { context: ownErrors() }));
  }
  resendInvitation(id: string): Promise<PersonSummary> {
    return firstValueFrom(this.http.post<PersonSummary>(`/api/people/${id}/invitation`, {}));
  }
  deactivate(id: string): Promise<PersonSummary> {
    return firstValueFrom(this.http.post<PersonSummary>(`/api/people/${id}/deactivate`, {}));
  }
  reactivate(id: string): Promise<PersonSummary> {
    return firstValueFrom(this.http.post<PersonSummary>(`/api/people/${id}/reactivate`, {}));
  }
  setPassword(body: SetPasswordRequest): Promise<SetPasswordResponse> {
    return firstValueFrom(this.http.post<SetPasswordResponse>('/api/auth/set-password', body, { context: ownErrors() }));
  }
  standInMail() {
    return this.http.get<StandInMessage[]>('/api/dev/mail', { context: ownErrors() });
  }
}
