import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { AddendumView, AuditEventView, QueueItem, SignOffDetail } from '@setwright/contracts/signoff';
import { ownErrors } from '../../core/session';

/** Calls for the sign-off queue, the review screen, send-backs and addenda. */
@Injectable({ providedIn: 'root' })
export class SignOffApi {
  private readonly http = inject(HttpClient);

  queue() {
    return this.http.get<QueueItem[]>('/api/sign-off/queue');
  }
  detail(recordId: string) {
    return this.http.get<SignOffDetail>(`/api/records/${recordId}/signatures`);
  }
  audit(recordId: string) {
    return this.http.get<AuditEventView[]>(`/api/records/${recordId}/audit`);
  }
  signOff(recordId: string, password: string): Promise<SignOffDetail> {
    return firstValueFrom(this.http.post<SignOffDetail>(`/api/records/${recordId}/sign-off`, { password }, { context: ownErrors() }));
  }
  sendBack(recordId: string, reason: string): Promise<SignOffDetail> {
    return firstValueFrom(this.http.post<SignOffDetail>(`/api/records/${recordId}/send-back`, { reason }, { context: ownErrors() }));
  }
  addAddendum(recordId: string, text: string, password: string): Promise<AddendumView> {
    return firstValueFrom(this.http.post<AddendumView>(`/api/records/${recordId}/addenda`, { text, password }, { context: ownErrors() }));
  }
}
