import { DataTypes } from 'sequelize';
import type { Migration } from '../migrate';

const person = (allowNull: boolean) => ({ type: DataTypes.UUID, allowNull, references: { model: 'users', key: 'id' } });
const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
};

export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('blade_types', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    width_mm: { type: DataTypes.DOUBLE, allowNull: false },
    thickness_mm: { type: DataTypes.DOUBLE, allowNull: false },
    length_mm: { type: DataTypes.DOUBLE, allowNull: false },
    pitch: { type: DataTypes.STRING(20), allowNull: false },
    material: { type: DataTypes.ENUM('bi-metal', 'carbon'), allowNull: false },
    stock: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    listed: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    note: { type: DataTypes.STRING(200), allowNull: true },
    ...timestamps,
  });
  // A blade type is its size, pitch and material: one row each, so a fitted blade matches exactly one.
  await q.addIndex('blade_types', ['width_mm', 'thickness_mm', 'length_mm', 'pitch', 'material'], { unique: true, name: 'blade_types_one_per_size' });
  await q.sequelize.query(`ALTER TABLE blade_types ADD CONSTRAINT blade_types_stock_not_negative CHECK (stock >= 0)`);

  await q.createTable('blade_fittings', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    machine_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'machines', key: 'id' } },
    blade_type_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'blade_types', key: 'id' } },
    record_id: { type: DataTypes.UUID, allowNull: true, unique: true, references: { model: 'setup_records', key: 'id' } },
    fitted_at: { type: DataTypes.DATE, allowNull: false },
    fitted_by_id: person(true),
    from_stock: { type: DataTypes.BOOLEAN, allowNull: false },
    removed_at: { type: DataTypes.DATE, allowNull: true },
    removed_by_id: person(true),
    removal_reason: { type: DataTypes.ENUM('worn', 'broken', 'stripped_teeth', 'wrong_pitch', 'other'), allowNull: true },
    removal_note: { type: DataTypes.TEXT, allowNull: true },
    removal_record_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'setup_records', key: 'id' } },
    ...timestamps,
  });
  await q.addIndex('blade_fittings', ['machine_id', 'fitted_at']);
  await q.sequelize.query(`
    -- One blade on a saw at a time.
    CREATE UNIQUE INDEX blade_fittings_one_on_saw ON blade_fittings (machine_id) WHERE removed_at IS NULL;
    ALTER TABLE blade_fittings ADD CONSTRAINT blade_fittings_removal_whole CHECK ((removed_at IS NULL) = (removal_reason IS NULL));
    ALTER TABLE blade_fittings ADD CONSTRAINT blade_fittings_removed_after_fitting CHECK (removed_at IS NULL OR removed_at >= fitted_at);

    -- A fitting is history: once written, only its removal is filled in, once; nothing is deleted.
    CREATE FUNCTION blade_fittings_history() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF TG_OP = 'DELETE' THEN
        RAISE EXCEPTION 'blade fittings are kept as history and cannot be deleted' USING ERRCODE = 'P0001';
      END IF;
      IF OLD.removed_at IS NULL
         AND (to_jsonb(NEW) - 'removed_at' - 'removed_by_id' - 'removal_reason' - 'removal_note' - 'removal_record_id' - 'updated_at')
           = (to_jsonb(OLD) - 'removed_at' - 'removed_by_id' - 'removal_reason' - 'removal_note' - 'removal_record_id' - 'updated_at') THEN
        RETURN NEW;
      END IF;
      RAISE EXCEPTION 'blade fitting % is kept as history; only its removal can be recorded, once', OLD.id USING ERRCODE = 'P0001';
    END $$;
    CREATE TRIGGER blade_fittings_history BEFORE UPDATE OR DELETE ON blade_fittings FOR EACH ROW EXECUTE FUNCTION blade_fittings_history();
  `);

  await q.createTable('blade_cut_logs', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    fitting_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'blade_fittings', key: 'id' } },
    shape: { type: DataTypes.STRING(20), allowNull: false },
    unit: { type: DataTypes.STRING(4), allowNull: false },
    sizes: { type: DataTypes.JSONB, allowNull: false },
    count: { type: DataTypes.INTEGER, allowNull: false },
    area_m2: { type: DataTypes.DOUBLE, allowNull: false },
    note: { type: DataTypes.STRING(200), allowNull: true },
    logged_by_id: person(false),
    logged_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('blade_cut_logs', ['fitting_id', 'logged_at']);
  await q.sequelize.query(`
    ALTER TABLE blade_cut_logs ADD CONSTRAINT blade_cut_logs_positive CHECK (count > 0 AND area_m2 > 0);
    CREATE TRIGGER blade_cut_logs_append_only BEFORE UPDATE OR DELETE ON blade_cut_logs FOR EACH ROW EXECUTE FUNCTION setwright_append_only();
  `);

  await q.createTable('competency_authorisations', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    person_id: person(false),
    procedure_key: { type: DataTypes.STRING(60), allowNull: false },
    granted_by_id: person(false),
    granted_at: { type: DataTypes.DATE, allowNull: false },
    expires_on: { type: DataTypes.DATEONLY, allowNull: false },
    note: { type: DataTypes.TEXT, allowNull: true },
    ended_at: { type: DataTypes.DATE, allowNull: true },
    ended_by_id: person(true),
    end_kind: { type: DataTypes.ENUM('revoked', 'renewed'), allowNull: true },
    end_reason: { type: DataTypes.TEXT, allowNull: true },
  });
  await q.addIndex('competency_authorisations', ['person_id', 'procedure_key', 'granted_at']);
  await q.addIndex('competency_authorisations', ['expires_on']);
  await q.sequelize.query(`
    -- Nobody authorises themselves; at most one open authorisation per person and procedure.
    ALTER TABLE competency_authorisations ADD CONSTRAINT competency_authorisations_not_self CHECK (person_id <> granted_by_id);
    ALTER TABLE competency_authorisations ADD CONSTRAINT competency_authorisations_end_whole CHECK ((ended_at IS NULL) = (end_kind IS NULL));
    CREATE UNIQUE INDEX competency_authorisations_one_open ON competency_authorisations (person_id, procedure_key) WHERE ended_at IS NULL;

    -- Training records are kept (PUWER reg 9; 29 CFR 1910.147 (c)(7)(iv)): an authorisation is only ever ended, once.
    CREATE FUNCTION competency_authorisations_history() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF TG_OP = 'DELETE' THEN
        RAISE EXCEPTION 'authorisations are kept as history and cannot be deleted' USING ERRCODE = 'P0001';
      END IF;
      IF OLD.ended_at IS NULL
         AND (to_jsonb(NEW) - 'ended_at' - 'ended_by_id' - 'end_kind' - 'end_reason')
           = (to_jsonb(OLD) - 'ended_at' - 'ended_by_id' - 'end_kind' - 'end_reason') THEN
        RETURN NEW;
      END IF;
      RAISE EXCEPTION 'authorisation % is kept as history; it can only be ended, once', OLD.id USING ERRCODE = 'P0001';
    END $$;
    CREATE TRIGGER competency_authorisations_history BEFORE UPDATE OR DELETE ON competency_authorisations
      FOR EACH ROW EXECUTE FUNCTION competency_authorisations_history();
  `);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('competency_authorisations');
  await q.dropTable('blade_cut_logs');
  await q.dropTable('blade_fittings');
  await q.dropTable('blade_types');
  await q.sequelize.query(`
    DROP FUNCTION IF EXISTS competency_authorisations_history();
    DROP FUNCTION IF EXISTS blade_fittings_history();
    DROP TYPE IF EXISTS "enum_competency_authorisations_end_kind";
    DROP TYPE IF EXISTS "enum_blade_fittings_removal_reason";
    DROP TYPE IF EXISTS "enum_blade_types_material";
  `);
};
