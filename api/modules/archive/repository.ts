import { QueryTypes, type Sequelize } from 'sequelize';
import { archiveBound, type ArchiveFilter, type ArchiveItem, type ArchiveQuery, type ArchiveSort } from '../../contracts/archive';

interface Row {
  id: string;
  status: ArchiveItem['status'];
  result: ArchiveItem['result'];
  created_at: Date;
  signed_at: Date | null;
  record_hash: string | null;
  previous_hash: string | null;
  machine_id: string;
  machine_name: string;
  asset_tag: string;
  procedure_key: string;
  procedure_version: number;
  procedure_title: string;
  performed_by: string;
  approved_by: string | null;
  /** signed_at as PostgreSQL prints it, microseconds and all: the exact keyset position. */
  signed_key?: string | null;
}

/** One archive row with the hashes the evidence pack needs too. */
export type ArchiveRow = ArchiveItem & { previousHash: string | null };

const SELECT = `
  SELECT r.id, r.status, r.result, r.created_at, r.signed_at, r.record_hash, r.previous_hash,
         m.id AS machine_id, m.name AS machine_name, m.asset_tag,
         pv.key AS procedure_key, pv.version AS procedure_version, pv.title AS procedure_title,
         u.display_name AS performed_by,
         (SELECT s.printed_name FROM signatures s
           WHERE s.record_id = r.id AND s.meaning = 'approved'
           ORDER BY s.signed_at DESC LIMIT 1) AS approved_by
    FROM setup_records r
    JOIN machines m ON m.id = r.machine_id
    JOIN procedure_versions pv ON pv.id = r.procedure_version_id
    JOIN users u ON u.id = r.started_by_id`;

/** ORDER BY for each sort; the record id breaks ties so paging never repeats or skips a row. */
function orderBy(sort: ArchiveSort, dir: 'asc' | 'desc'): string {
  const d = dir === 'asc' ? 'ASC' : 'DESC';
  switch (sort) {
    case 'signedAt':
      return `r.signed_at ${d} NULLS LAST, r.id ${d}`;
    case 'createdAt':
      return `r.created_at ${d}, r.id ${d}`;
    case 'machine':
      return `m.name ${d}, m.asset_tag ${d}, r.signed_at DESC NULLS LAST, r.id DESC`;
    case 'procedure':
      return `pv.title ${d}, pv.version ${d}, r.signed_at DESC NULLS LAST, r.id DESC`;
    case 'result':
      return `r.result ${d} NULLS LAST, r.signed_at DESC NULLS LAST, r.id DESC`;
  }
}

const likePattern = (text: string) => `%${text.replace(/[\\%_]/g, (c) => '\\' + c)}%`;

/** The WHERE clause and its bound values for a filter (never string-built from input). */
export function whereFor(filter: ArchiveFilter, extra: string[] = []): { sql: string; replacements: Record<string, unknown> } {
  const clauses = [...extra];
  const replacements: Record<string, unknown> = {};
  if (filter.machineId) {
    clauses.push('r.machine_id = :machineId');
    replacements['machineId'] = filter.machineId;
  }
  if (filter.procedure) {
    clauses.push('r.procedure_version_id IN (SELECT id FROM procedure_versions WHERE key = :procedure)');
    replacements['procedure'] = filter.procedure;
  }
  if (filter.status) {
    clauses.push('r.status = :status');
    replacements['status'] = filter.status;
  }
  if (filter.result) {
    clauses.push('r.result = :result');
    replacements['result'] = filter.result;
  }
  if (filter.person) {
    // People are few: find who matches, then the records they performed or signed.
    clauses.push(`r.id IN (
      SELECT p.id FROM setup_records p WHERE p.started_by_id IN (SELECT id FROM users WHERE display_name ILIKE :person OR email ILIKE :person)
      UNION
      SELECT s.record_id FROM signatures s WHERE s.signer_id IN (SELECT id FROM users WHERE display_name ILIKE :person OR email ILIKE :person))`);
    replacements['person'] = likePattern(filter.person);
  }
  const column = filter.dateField === 'createdAt' ? 'r.created_at' : 'r.signed_at';
  if (filter.from) {
    clauses.push(`${column} >= :from`);
    replacements['from'] = new Date(archiveBound(filter.from, 'from'));
  }
  if (filter.to) {
    clauses.push(`${column} < :to`);
    replacements['to'] = new Date(archiveBound(filter.to, 'to'));
  }
  return { sql: clauses.length ? `WHERE ${clauses.join(' AND ')}` : '', replacements };
}

function toItem(row: Row): ArchiveRow {
  return {
    id: row.id,
    status: row.status,
    result: row.result,
    machine: { id: row.machine_id, name: row.machine_name, assetTag: row.asset_tag },
    procedure: { key: row.procedure_key, version: row.procedure_version, title: row.procedure_title },
    performedBy: row.performed_by,
    approvedBy: row.approved_by,
    createdAt: new Date(row.created_at).toISOString(),
    signedAt: row.signed_at ? new Date(row.signed_at).toISOString() : null,
    recordHash: row.record_hash,
    previousHash: row.previous_hash,
  };
}

/** Archive queries in plain SQL, shaped for the indexes of migration 0006. */
export class ArchiveRepository {
  constructor(private readonly sequelize: Sequelize) {}

  async page(q: ArchiveQuery): Promise<{ items: ArchiveItem[]; total: number }> {
    const where = whereFor(q);
    const [rows, counted] = await Promise.all([
      this.sequelize.query<Row>(`${SELECT} ${where.sql} ORDER BY ${orderBy(q.sort, q.dir)} LIMIT :limit OFFSET :offset`, {
        type: QueryTypes.SELECT,
        replacements: { ...where.replacements, limit: q.size, offset: q.page * q.size },
      }),
      this.sequelize.query<{ total: string }>(`SELECT count(*) AS total FROM setup_records r ${where.sql}`, {
        type: QueryTypes.SELECT,
        replacements: where.replacements,
      }),
    ]);
    const items = rows.map((r) => {
      const { previousHash: _previous, ...item } = toItem(r);
      return item;
    });
    return { items, total: Number(counted[0]?.total ?? 0) };
  }

  /** How many signed-off records a filter selects, up to a moment (the evidence pack's snapshot). */
  async countSigned(filter: ArchiveFilter, until: Date): Promise<number> {
    const where = whereFor(filter, ["r.status = 'signed_off'", 'r.signed_at <= :until']);
    const [row] = await this.sequelize.query<{ total: string }>(`SELECT count(*) AS total FROM setup_records r ${where.sql}`, {
      type: QueryTypes.SELECT,
      replacements: { ...where.replacements, until },
    });
    return Number(row?.total ?? 0);
  }

  /**
   * Signed-off records of a filter, oldest signature first, in batches (keyset paging on signed_at, id),
   * so a pack of any size never holds more than one batch of rows.
   */
  async *signedInBatches(filter: ArchiveFilter, until: Date, batchSize = 200): AsyncGenerator<ArchiveRow[]> {
    let after: { signedKey: string; id: string } | null = null;
    for (;;) {
      const extra = ["r.status = 'signed_off'", 'r.signed_at <= :until'];
      if (after) extra.push('(r.signed_at, r.id) > (CAST(:afterSignedKey AS timestamptz), CAST(:afterId AS uuid))');
      const where = whereFor(filter, extra);
      const select = SELECT.replace('r.previous_hash,', 'r.previous_hash, CAST(r.signed_at AS text) AS signed_key,');
      const rows: Row[] = await this.sequelize.query<Row>(`${select} ${where.sql} ORDER BY r.signed_at ASC, r.id ASC LIMIT :limit`, {
        type: QueryTypes.SELECT,
        replacements: { ...where.replacements, until, limit: batchSize, ...(after ? { afterSignedKey: after.signedKey, afterId: after.id } : {}) },
      });
      if (!rows.length) return;
      yield rows.map(toItem);
      const last: Row = rows[rows.length - 1]!;
      after = { signedKey: last.signed_key!, id: last.id };
      if (rows.length < batchSize) return;
    }
  }
}
