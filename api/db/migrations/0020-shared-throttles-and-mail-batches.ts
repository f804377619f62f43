import { DataTypes } from 'sequelize';
import type { Migration } from '../migrate';

/**
 * State that every API instance must share when several run against one database:
 * - throttle_counters: the sign-in, witness and set-password throttles' hit counts (one row a key,
 *   counted up by one atomic upsert, so two instances count the same tries);
 * - mail_batches: keys of e-mail batches queued at most once (the daily reminder, once a workshop day).
 */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('throttle_counters', {
    key: { type: DataTypes.TEXT, primaryKey: true },
    hits: { type: DataTypes.INTEGER, allowNull: false },
    reset_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('throttle_counters', ['reset_at']);

  await q.createTable('mail_batches', {
    key: { type: DataTypes.STRING(200), primaryKey: true },
    created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: q.sequelize.fn('now') },
  });
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('mail_batches');
  await q.dropTable('throttle_counters');
};
