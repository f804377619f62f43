import type { MachineSummary } from '../../contracts/machines';
import { Machine } from './model';

function toSummary(m: Machine): MachineSummary {
  return { id: m.id, name: m.name, assetTag: m.assetTag, location: m.location, kind: m.kind, model: m.model, spec: m.spec };
}

export async function listMachines(): Promise<MachineSummary[]> {
  const rows = await Machine.findAll({ order: [['name', 'ASC']] });
  return rows.map(toSummary);
}

export async function findMachine(id: string): Promise<MachineSummary | null> {
  const row = await Machine.findByPk(id);
  return row ? toSummary(row) : null;
}

/** Insert a machine by asset tag if it is not there yet (used by the demo seed). */
export async function ensureMachine(input: Omit<MachineSummary, 'id'>): Promise<MachineSummary> {
  const [row] = await Machine.findOrCreate({ where: { assetTag: input.assetTag }, defaults: input });
  return toSummary(row);
}
