import { DataTypes } from 'sequelize';
import type { Migration } from '../migrate';

const person = (allowNull: boolean) => ({ type: DataTypes.UUID, allowNull, references: { model: 'users', key: 'id' } });
const record = { type: DataTypes.UUID, allowNull: false, references: { model: 'setup_records', key: 'id' } };

export const up: Migration['up'] = async ({ context: q }) => {
  await q.addColumn('setup_records', 'record_hash', { type: DataTypes.STRING(64), allowNull: true });
  await q.addColumn('setup_records', 'previous_hash', { type: DataTypes.STRING(64), allowNull: true });
  await q.addColumn('setup_records', 'signed_at', { type: DataTypes.DATE, allowNull: true });
  await q.addColumn('setup_records', 'pdf_key', { type: DataTypes.STRING(200), allowNull: true });
  await q.addIndex('setup_records', ['machine_id', 'signed_at']);

  await q.createTable('signatures', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    record_id: record,
    signer_id: person(false),
    meaning: { type: DataTypes.ENUM('performed', 'witnessed', 'approved'), allowNull: false },
    printed_name: { type: DataTypes.STRING(120), allowNull: false },
    signed_at: { type: DataTypes.DATE, allowNull: false },
    step_id: { type: DataTypes.STRING(60), allowNull: true },
    entry_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'step_entries', key: 'id' } },
  });
  await q.addIndex('signatures', ['record_id']);

  await q.createTable('record_returns', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    record_id: record,
    returned_by_id: person(false),
    reason: { type: DataTypes.TEXT, allowNull: false },
    returned_at: { type: DataTypes.DATE, allowNull: false },
  });

  await q.createTable('record_addenda', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    record_id: record,
    author_id: person(false),
    printed_name: { type: DataTypes.STRING(120), allowNull: false },
    text: { type: DataTypes.TEXT, allowNull: false },
    signed_at: { type: DataTypes.DATE, allowNull: false },
    addendum_hash: { type: DataTypes.STRING(64), allowNull: false },
  });

  await q.createTable('audit_events', {
    id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
    at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
    actor_id: person(true),
    action: { type: DataTypes.STRING(40), allowNull: false },
    record_id: { type: DataTypes.UUID, allowNull: true },
    detail: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
  });
  await q.addIndex('audit_events', ['record_id', 'at']);

  await q.sequelize.query(`
    -- History tables keep what was written: no edits, no deletions, whoever connects.
    CREATE FUNCTION setwright_append_only() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION '% rows are kept as written and cannot be changed or deleted', TG_TABLE_NAME USING ERRCODE = 'P0001';
    END $$;
    CREATE TRIGGER signatures_append_only BEFORE UPDATE OR DELETE ON signatures FOR EACH ROW EXECUTE FUNCTION setwright_append_only();
    CREATE TRIGGER record_returns_append_only BEFORE UPDATE OR DELETE ON record_returns FOR EACH ROW EXECUTE FUNCTION setwright_append_only();
    CREATE TRIGGER record_addenda_append_only BEFORE UPDATE OR DELETE ON record_addenda FOR EACH ROW EXECUTE FUNCTION setwright_append_only();
    CREATE TRIGGER audit_events_append_only BEFORE UPDATE OR DELETE ON audit_events FOR EACH ROW EXECUTE FUNCTION setwright_append_only();

    -- A signed-off record is locked: the record row, and nothing more may be added to its entries or signatures.
    CREATE FUNCTION setup_records_locked() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF OLD.status = 'signed_off' THEN
        IF TG_OP = 'UPDATE' AND NEW.pdf_key IS DISTINCT FROM OLD.pdf_key AND OLD.pdf_key IS NULL
           AND (to_jsonb(NEW) - 'pdf_key' - 'updated_at') = (to_jsonb(OLD) - 'pdf_key' - 'updated_at') THEN
          RETURN NEW; -- the rendered PDF's key is filled in once, after signing
        END IF;
        RAISE EXCEPTION 'record % is signed off and locked; add an addendum instead', OLD.id USING ERRCODE = 'P0001';
      END IF;
      IF TG_OP = 'DELETE' THEN RETURN OLD; END IF;
      RETURN NEW;
    END $$;
    CREATE TRIGGER setup_records_locked BEFORE UPDATE OR DELETE ON setup_records FOR EACH ROW EXECUTE FUNCTION setup_records_locked();

    CREATE FUNCTION record_not_locked() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF EXISTS (SELECT 1 FROM setup_records WHERE id = NEW.record_id AND status = 'signed_off') THEN
        RAISE EXCEPTION 'record % is signed off and locked; add an addendum instead', NEW.record_id USING ERRCODE = 'P0001';
      END IF;
      RETURN NEW;
    END $$;
    CREATE TRIGGER step_entries_record_locked BEFORE INSERT ON step_entries FOR EACH ROW EXECUTE FUNCTION record_not_locked();
    CREATE TRIGGER signatures_record_locked BEFORE INSERT ON signatures FOR EACH ROW EXECUTE FUNCTION record_not_locked();
  `);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.sequelize.query(`
    DROP TRIGGER IF EXISTS signatures_record_locked ON signatures;
    DROP TRIGGER IF EXISTS step_entries_record_locked ON step_entries;
    DROP TRIGGER IF EXISTS setup_records_locked ON setup_records;
    DROP FUNCTION IF EXISTS record_not_locked();
    DROP FUNCTION IF EXISTS setup_records_locked();
  `);
  await q.dropTable('audit_events');
  await q.dropTable('record_addenda');
  await q.dropTable('record_returns');
  await q.dropTable('signatures');
  await q.sequelize.query('DROP FUNCTION IF EXISTS setwright_append_only(); DROP TYPE IF EXISTS "enum_signatures_meaning";');
  for (const c of ['pdf_key', 'signed_at', 'previous_hash', 'record_hash']) await q.removeColumn('setup_records', c);
};
