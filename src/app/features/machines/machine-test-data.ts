import type { HttpRequest } from '@angular/common/http';
import type { HttpTestingController, TestRequest } from '@angular/common/http/testing';
import type { MachineDetail, MachineStatus } from '@setwright/contracts/machines';
import type { ScheduleView } from '@setwright/contracts/schedules';

/** An invented saw for the client specs, in the shape GET /api/machines/:id returns. */
export function testMachine(status: Partial<MachineStatus> = {}, more: Partial<MachineDetail> = {}): MachineDetail {
  return {
    id: 'm1',
    name: 'Bay 2 bandsaw',
    assetTag: 'BFW-SAW-01',
    location: 'Bay 2, cutting area',
    kind: 'horizontal_bandsaw',
    model: 'Invented HB-260',
    photoId: null,
    spec: {
      wheelDiameterMm: 300,
      centreDistanceMm: 900,
      bladeLengthMm: 2742,
      bladeWidthMm: 27,
      bladeThicknessMm: 0.9,
      tensionRangeKgf: { min: 700, max: 900 },
      tensionReads: 'wheel-load',
      guideClearanceMm: { min: 0.08, max: 0.12 },
      motorRpm: 1400,
      gearboxRatio: 30,
      speedSteps: [
        { label: '1 (slowest)', driverMm: 60, drivenMm: 133 },
        { label: '2', driverMm: 80, drivenMm: 111 },
      ],
      beltCentreDistanceMm: 420,
      beltDeflectionMm: 10,
    },
    status: { state: 'ready', label: 'Ready', taggedOutBy: [], dueCount: 0, nextDueAt: null, ...status },
    currentBlade: null,
    schedules: [],
    history: [],
    moves: [],
    startable: 'all',
    ...more,
  };
}

export function testSchedule(more: Partial<ScheduleView> = {}): ScheduleView {
  return {
    procedureKey: 'blade-tension',
    procedureTitle: 'Blade tensioning',
    intervalDays: 30,
    triggers: ['after_blade_change'],
    allowedWhileTaggedOut: false,
    lastPassedAt: '2026-01-20T10:00:00.000Z',
    lastPassedRecordId: 'r0',
    dueAt: '2026-02-19T10:00:00.000Z',
    state: 'overdue',
    reasons: ['Every 30 days: last passed 20 Jan 2026.'],
    ...more,
  };
}

/** Wait for a request the component makes once it has rendered (a pending request blocks whenStable). */
export async function nextRequest(http: HttpTestingController, match: (r: HttpRequest<unknown>) => boolean): Promise<TestRequest> {
  for (let i = 0; i < 80; i++) {
    const found = http.match(match);
    if (found.length) return found[0]!;
    await new Promise((r) => setTimeout(r, 25));
  }
  throw new Error('the expected request was never made');
}
