import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { MachineDetail, MachineListItem, MachineRequestInput } from '@setwright/contracts/machines';
import type { MachineTrends } from '@setwright/contracts/trends';
import type { DueList, MachineSchedulesInput, ScheduleView } from '@setwright/contracts/schedules';
import { ownErrors } from '../../core/session';

/** The machine register's calls: the register, one machine, its schedules, QR labels and the due list. */
@Injectable({ providedIn: 'root' })
export class MachineApi {
  private readonly http = inject(HttpClient);

  list() {
    return this.http.get<MachineListItem[]>('/api/machines');
  }

  get(id: string) {
    return this.http.get<MachineDetail>(`/api/machines/${id}`);
  }

  /** Each recorded reading over time, with the limits in force and the drift rule's verdict. */
  trends(id: string) {
    return this.http.get<MachineTrends>(`/api/machines/${id}/trends`);
  }

  due() {
    return this.http.get<DueList>('/api/schedules/due');
  }

  /** Register (no id) or change a machine; field problems come back to the form. */
  save(body: MachineRequestInput, id?: string): Promise<MachineDetail> {
    const request = id
      ? this.http.put<MachineDetail>(`/api/machines/${id}`, body, { context: ownErrors() })
      : this.http.post<MachineDetail>('/api/machines', body, { context: ownErrors() });
    return firstValueFrom(request);
  }

  saveSchedules(id: string, body: MachineSchedulesInput): Promise<ScheduleView[]> {
    return firstValueFrom(this.http.put<ScheduleView[]>(`/api/machines/${id}/schedules`, body, { context: ownErrors() }));
  }

  /** The printable sheet of QR labels, for the machines named or the whole register. */
  labels(ids?: string[]): Promise<Blob> {
    const params: Record<string, string> = ids?.length ? { ids: ids.join(',') } : {};
    return firstValueFrom(this.http.get('/api/machines/labels.pdf', { params, responseType: 'blob' }));
  }
}

/** Open a PDF the API made in a new tab (or save it where the browser will not open one). */
export function openPdf(blob: Blob, fileName: string): void {
  const url = URL.createObjectURL(blob);
  const opened = window.open(url, '_blank', 'noopener');
  if (!opened) {
    const a = document.createElement('a');
    a.href = url;
    a.download = fileName;
    a.click();
  }
  setTimeout(() => URL.revokeObjectURL(url), 60_000);
}
