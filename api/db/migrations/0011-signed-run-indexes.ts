import type { Migration } from '../migrate';

// Machine status reads only the signed records that can matter (see MachineStatusService.derive):
// each machine's latest pass and standing failures of one procedure version, the first failure
// after a time, and the first blade change after a time. These partial indexes make each of those
// a short index range, however long a machine's history grows.
const INDEXES: [name: string, definition: string][] = [
  ['setup_records_signed_version_result_done', 'setup_records (machine_id, procedure_version_id, result, (COALESCE(finished_at, signed_at)))'],
  ['setup_records_signed_result_done', 'setup_records (machine_id, result, (COALESCE(finished_at, signed_at)))'],
];

export const up: Migration['up'] = async ({ context: q }) => {
  for (const [name, definition] of INDEXES) await q.sequelize.query(`CREATE INDEX ${name} ON ${definition} WHERE status = 'signed_off'`);
};

export const down: Migration['down'] = async ({ context: q }) => {
  for (const [name] of INDEXES) await q.sequelize.query(`DROP INDEX IF EXISTS ${name}`);
};
