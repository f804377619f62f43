import { DataTypes } from 'sequelize';
import type { Migration } from '../migrate';

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
};

/**
 * The register's own history (registrations, moves, changes), check schedules per machine and
 * procedure, a photo on each machine, and the machine as it stood when each record started: a
 * record's hash covers its machine's name and place, so a later move must not change what it signed.
 */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.addColumn('machines', 'photo_id', {
    type: DataTypes.UUID,
    allowNull: true,
    references: { model: 'photos', key: 'id' },
    onDelete: 'SET NULL',
  });

  await q.createTable('machine_events', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    machine_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'machines', key: 'id' }, onDelete: 'CASCADE' },
    kind: { type: DataTypes.ENUM('registered', 'relocated', 'changed'), allowNull: false },
    actor_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'users', key: 'id' } },
    detail: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  });
  await q.addIndex('machine_events', ['machine_id', 'at']);

  await q.createTable('machine_schedules', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    machine_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'machines', key: 'id' }, onDelete: 'CASCADE' },
    procedure_key: { type: DataTypes.STRING(60), allowNull: false },
    interval_days: { type: DataTypes.INTEGER, allowNull: true },
    triggers: { type: DataTypes.ARRAY(DataTypes.STRING(30)), allowNull: false, defaultValue: [] },
    allowed_while_tagged_out: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    ...timestamps,
  });
  await q.addIndex('machine_schedules', ['machine_id', 'procedure_key'], { unique: true });
  await q.sequelize.query(
    `ALTER TABLE machine_schedules ADD CONSTRAINT machine_schedules_interval CHECK (interval_days IS NULL OR interval_days BETWEEN 1 AND 3650)`,
  );
  await q.sequelize.query(
    `ALTER TABLE machine_schedules ADD CONSTRAINT machine_schedules_triggers CHECK (triggers <@ ARRAY['after_blade_change','after_relocation','after_failed_check']::varchar(30)[])`,
  );

  await q.addColumn('setup_records', 'machine_snapshot', { type: DataTypes.JSONB, allowNull: true });
  // Until now machines could not be changed, so each record's machine is still as it was when it started.
  await q.sequelize.query(`
    UPDATE setup_records r
       SET machine_snapshot = jsonb_build_object('id', m.id, 'name', m.name, 'assetTag', m.asset_tag, 'model', m.model, 'location', m.location)
      FROM machines m
     WHERE m.id = r.machine_id AND r.machine_snapshot IS NULL`);
  // The signed-record lookups status and due dates make.
  await q.addIndex('setup_records', ['machine_id', 'status', 'finished_at']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.removeIndex('setup_records', ['machine_id', 'status', 'finished_at']);
  await q.removeColumn('setup_records', 'machine_snapshot');
  await q.dropTable('machine_schedules');
  await q.dropTable('machine_events');
  await q.sequelize.query('DROP TYPE IF EXISTS "enum_machine_events_kind"');
  await q.removeColumn('machines', 'photo_id');
};
