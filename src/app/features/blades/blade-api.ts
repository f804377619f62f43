import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type {
  BladeTypeView,
  CutLogView,
  FittingDetail,
  MachineBlades,
  MachineCurrentBlade,
  RemovalReason,
} from '@setwright/contracts/blades';
import { ownErrors } from '../../core/session';

/** What the blade-type form sends (sizes in mm). */
export interface BladeTypeBody {
  widthMm: number;
  thicknessMm: number;
  lengthMm: number;
  pitch: string;
  material: string;
  stock: number;
  note?: string | null;
  listed?: boolean;
}

/** What the cut-log form sends. */
export interface CutLogBody {
  shape: string;
  unit: string;
  diameter?: number;
  width?: number;
  height?: number;
  outside?: number;
  wall?: number;
  count: number;
  note?: string;
}

/** Calls for the Blades place: types and stock, the blades on the saws, removal and cut logs. */
@Injectable({ providedIn: 'root' })
export class BladeApi {
  private readonly http = inject(HttpClient);

  types() {
    return this.http.get<BladeTypeView[]>('/api/blades/types');
  }
  onSaws() {
    return this.http.get<MachineCurrentBlade[]>('/api/blades/machines');
  }
  machine(machineId: string) {
    return this.http.get<MachineBlades>(`/api/blades/machines/${machineId}`);
  }
  fitting(fittingId: string) {
    return this.http.get<FittingDetail>(`/api/blades/fittings/${fittingId}`);
  }
  addType(body: BladeTypeBody): Promise<BladeTypeView> {
    return firstValueFrom(this.http.post<BladeTypeView>('/api/blades/types', body, { context: ownErrors() }));
  }
  changeType(id: string, body: Partial<BladeTypeBody>): Promise<BladeTypeView> {
    return firstValueFrom(this.http.patch<BladeTypeView>(`/api/blades/types/${id}`, body, { context: ownErrors() }));
  }
  remove(fittingId: string, reason: RemovalReason, note?: string): Promise<FittingDetail> {
    return firstValueFrom(this.http.post<FittingDetail>(`/api/blades/fittings/${fittingId}/removal`, { reason, ...(note ? { note } : {}) }, { context: ownErrors() }));
  }
  logCuts(fittingId: string, body: CutLogBody): Promise<CutLogView> {
    return firstValueFrom(this.http.post<CutLogView>(`/api/blades/fittings/${fittingId}/cuts`, body, { context: ownErrors() }));
  }
}
