import { DataTypes } from 'sequelize';
import type { Migration } from '../migrate';

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
};
const person = (allowNull: boolean) => ({ type: DataTypes.UUID, allowNull, references: { model: 'users', key: 'id' } });

export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('procedure_versions', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    key: { type: DataTypes.STRING(60), allowNull: false },
    version: { type: DataTypes.INTEGER, allowNull: false },
    title: { type: DataTypes.STRING(120), allowNull: false },
    machine_kind: { type: DataTypes.STRING(40), allowNull: false },
    status: { type: DataTypes.ENUM('draft', 'approved', 'retired'), allowNull: false },
    body: { type: DataTypes.JSONB, allowNull: false },
    checksum: { type: DataTypes.STRING(64), allowNull: false },
    source: { type: DataTypes.ENUM('pack', 'editor'), allowNull: false },
    author_id: person(true),
    approved_by_id: person(true),
    approved_at: { type: DataTypes.DATE, allowNull: true },
    ...timestamps,
  });
  await q.addIndex('procedure_versions', ['key', 'version'], { unique: true });
  // At most one approved version of a procedure at a time.
  await q.sequelize.query(`CREATE UNIQUE INDEX procedure_versions_one_approved ON procedure_versions (key) WHERE status = 'approved'`);
  // Approved and retired versions never change: only approved → retired is allowed, and nothing but a draft may be deleted.
  await q.sequelize.query(`
    CREATE FUNCTION procedure_versions_frozen() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF TG_OP = 'DELETE' THEN
        IF OLD.status <> 'draft' THEN
          RAISE EXCEPTION 'procedure % version % is %, and cannot be deleted', OLD.key, OLD.version, OLD.status USING ERRCODE = 'P0001';
        END IF;
        RETURN OLD;
      END IF;
      IF OLD.status = 'draft' THEN RETURN NEW; END IF;
      IF OLD.status = 'approved' AND NEW.status = 'retired'
         AND NEW.body = OLD.body AND NEW.checksum = OLD.checksum AND NEW.key = OLD.key AND NEW.version = OLD.version
         AND NEW.title = OLD.title AND NEW.machine_kind = OLD.machine_kind
         AND NEW.approved_by_id IS NOT DISTINCT FROM OLD.approved_by_id AND NEW.approved_at IS NOT DISTINCT FROM OLD.approved_at THEN
        RETURN NEW;
      END IF;
      RAISE EXCEPTION 'procedure % version % is %, and cannot be changed', OLD.key, OLD.version, OLD.status USING ERRCODE = 'P0001';
    END $$;
    CREATE TRIGGER procedure_versions_frozen BEFORE UPDATE OR DELETE ON procedure_versions
      FOR EACH ROW EXECUTE FUNCTION procedure_versions_frozen();
  `);

  await q.createTable('setup_records', {
    id: { type: DataTypes.UUID, primaryKey: true },
    machine_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'machines', key: 'id' } },
    procedure_version_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'procedure_versions', key: 'id' } },
    machine_spec: { type: DataTypes.JSONB, allowNull: false },
    status: { type: DataTypes.ENUM('underway', 'ready_for_signoff', 'signed_off', 'returned', 'voided'), allowNull: false },
    result: { type: DataTypes.ENUM('passed', 'failed'), allowNull: true },
    started_by_id: person(false),
    finished_at: { type: DataTypes.DATE, allowNull: true },
    void_reason: { type: DataTypes.TEXT, allowNull: true },
    ...timestamps,
  });
  await q.addIndex('setup_records', ['machine_id', 'created_at']);
  await q.addIndex('setup_records', ['started_by_id', 'status']);
  await q.addIndex('setup_records', ['status', 'created_at']);

  await q.createTable('step_entries', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    record_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'setup_records', key: 'id' } },
    step_id: { type: DataTypes.STRING(60), allowNull: false },
    attempt: { type: DataTypes.INTEGER, allowNull: false },
    values: { type: DataTypes.JSONB, allowNull: false },
    evaluation: { type: DataTypes.JSONB, allowNull: false },
    outcome: { type: DataTypes.ENUM('done', 'out_of_limits'), allowNull: false },
    corrective_note: { type: DataTypes.TEXT, allowNull: true },
    entered_by_id: person(false),
    witnessed_by_id: person(true),
    witnessed_at: { type: DataTypes.DATE, allowNull: true },
    idempotency_key: { type: DataTypes.UUID, allowNull: false, unique: true },
    created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  });
  await q.addIndex('step_entries', ['record_id', 'step_id', 'attempt'], { unique: true });
  // Entries are a history: a re-measure is a new attempt, never an edit.
  await q.sequelize.query(`
    CREATE FUNCTION step_entries_append_only() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION 'step entries are kept as entered; add a new attempt instead' USING ERRCODE = 'P0001';
    END $$;
    CREATE TRIGGER step_entries_append_only BEFORE UPDATE OR DELETE ON step_entries
      FOR EACH ROW EXECUTE FUNCTION step_entries_append_only();
  `);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('step_entries');
  await q.dropTable('setup_records');
  await q.dropTable('procedure_versions');
  await q.sequelize.query('DROP FUNCTION IF EXISTS step_entries_append_only(); DROP FUNCTION IF EXISTS procedure_versions_frozen();');
  await q.sequelize.query('DROP TYPE IF EXISTS "enum_setup_records_status"; DROP TYPE IF EXISTS "enum_setup_records_result";');
  await q.sequelize.query('DROP TYPE IF EXISTS "enum_step_entries_outcome"; DROP TYPE IF EXISTS "enum_procedure_versions_status"; DROP TYPE IF EXISTS "enum_procedure_versions_source";');
};
