import type { MachineSummary } from '../../contracts/machines';
import type { ScheduleTrigger } from '../../contracts/schedules';
import { Machine, MachineSchedule } from './model';

function toSummary(m: Machine): MachineSummary {
  return { id: m.id, name: m.name, assetTag: m.assetTag, location: m.location, kind: m.kind, model: m.model, spec: m.spec, photoId: m.photoId ?? null };
}

/** Insert a machine by asset tag if it is not there yet (used by the demo seed). */
export async function ensureMachine(input: Omit<MachineSummary, 'id'>): Promise<MachineSummary> {
  const [row] = await Machine.findOrCreate({ where: { assetTag: input.assetTag }, defaults: input });
  return toSummary(row);
}

/** Add a schedule if the machine has none for that procedure yet (used by the demo seed; never changes one). */
export async function ensureSchedule(input: { machineId: string; procedureKey: string; intervalDays: number | null; triggers: ScheduleTrigger[] }): Promise<void> {
  await MachineSchedule.findOrCreate({
    where: { machineId: input.machineId, procedureKey: input.procedureKey },
    defaults: { ...input, allowedWhileTaggedOut: false },
  });
}
