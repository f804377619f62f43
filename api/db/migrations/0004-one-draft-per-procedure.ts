import type { Migration } from '../migrate';

// At most one open draft of a procedure at a time, held by the database as well as the API,
// so two admins starting a draft at the same moment cannot both succeed.
export const up: Migration['up'] = async ({ context: q }) => {
  await q.sequelize.query(`CREATE UNIQUE INDEX procedure_versions_one_draft ON procedure_versions (key) WHERE status = 'draft'`);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.sequelize.query('DROP INDEX IF EXISTS procedure_versions_one_draft');
};
