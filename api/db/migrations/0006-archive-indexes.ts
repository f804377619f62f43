import type { Migration } from '../migrate';

// Indexes for the archive (the Records list and evidence packs): its default order (newest signature
// first), its date ranges, and its filters by machine, procedure version and person.
const INDEXES: [name: string, definition: string][] = [
  ['setup_records_signed_at_id', 'setup_records (signed_at DESC NULLS LAST, id DESC)'],
  ['setup_records_created_at_id', 'setup_records (created_at DESC, id DESC)'],
  // Each machine's and each procedure version's records in the list's order: filters by machine or
  // procedure, and sorting by machine or procedure (walked machine by machine, stopping at the page).
  ['setup_records_machine_signed_at_id', 'setup_records (machine_id, signed_at DESC NULLS LAST, id DESC)'],
  ['setup_records_procedure_signed_at_id', 'setup_records (procedure_version_id, signed_at DESC NULLS LAST, id DESC)'],
  ['setup_records_result_signed_at_id', 'setup_records (result, signed_at DESC NULLS LAST, id DESC)'],
  ['setup_records_started_by_signed_at', 'setup_records (started_by_id, signed_at DESC NULLS LAST)'],
  ['machines_name_asset_tag', 'machines (name, asset_tag)'],
  ['procedure_versions_title_version', 'procedure_versions (title, version)'],
  ['signatures_signer_record', 'signatures (signer_id, record_id)'],
  ['signatures_record_meaning', 'signatures (record_id, meaning, signed_at DESC)'],
];

export const up: Migration['up'] = async ({ context: q }) => {
  for (const [name, definition] of INDEXES) await q.sequelize.query(`CREATE INDEX IF NOT EXISTS ${name} ON ${definition}`);
};

export const down: Migration['down'] = async ({ context: q }) => {
  for (const [name] of [...INDEXES].reverse()) await q.sequelize.query(`DROP INDEX IF EXISTS ${name}`);
};
