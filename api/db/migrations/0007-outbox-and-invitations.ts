import PgBoss from 'pg-boss';
import { DataTypes } from 'sequelize';
import type { Migration } from '../migrate';

/** pg-boss's own tables live in this schema; the mail worker checks their version at start and never changes them itself. */
export const JOB_SCHEMA = 'pgboss';

/**
 * Invitations (single-use set-password links, stored only as hashes), deactivation of people,
 * the outbox of e-mails, and the job queue that delivers them (pg-boss 10, schema version 24).
 * When pg-boss is upgraded, a new migration applies `PgBoss.getMigrationPlans(JOB_SCHEMA, <old version>)`.
 */
export const up: Migration['up'] = async ({ context: q }) => {
  // Deactivated is a state of its own: an invited person is not active yet either, but is not deactivated.
  await q.addColumn('users', 'deactivated_at', { type: DataTypes.DATE, allowNull: true });

  await q.createTable('invitations', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    user_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    invited_by_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'users', key: 'id' } },
    expires_at: { type: DataTypes.DATE, allowNull: false },
    used_at: { type: DataTypes.DATE, allowNull: true },
    revoked_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
    updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  });
  await q.addIndex('invitations', ['user_id']);

  await q.createTable('outbox_messages', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    kind: { type: DataTypes.STRING(40), allowNull: false },
    to_address: { type: DataTypes.STRING(254), allowNull: false },
    to_name: { type: DataTypes.STRING(120), allowNull: false, defaultValue: '' },
    subject: { type: DataTypes.STRING(300), allowNull: false },
    text_body: { type: DataTypes.TEXT, allowNull: false },
    html_body: { type: DataTypes.TEXT, allowNull: false },
    record_id: { type: DataTypes.UUID, allowNull: true },
    status: { type: DataTypes.ENUM('queued', 'sent', 'failed'), allowNull: false, defaultValue: 'queued' },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    last_error: { type: DataTypes.TEXT, allowNull: true },
    message_id: { type: DataTypes.STRING(200), allowNull: true },
    sent_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
    updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  });
  await q.addIndex('outbox_messages', ['status', 'created_at']);
  await q.addIndex('outbox_messages', ['record_id']);

  const [rows] = await q.sequelize.query(`SELECT to_regclass('${JOB_SCHEMA}.version') AS present`);
  if (!(rows as { present: string | null }[])[0]?.present) await q.sequelize.query(PgBoss.getConstructionPlans(JOB_SCHEMA));
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.sequelize.query(`DROP SCHEMA IF EXISTS ${JOB_SCHEMA} CASCADE`);
  await q.dropTable('outbox_messages');
  await q.sequelize.query('DROP TYPE IF EXISTS "enum_outbox_messages_status"');
  await q.dropTable('invitations');
  await q.removeColumn('users', 'deactivated_at');
};
