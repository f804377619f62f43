import type { Migration } from '../migrate';

// Saving a step entry in one statement (one round trip to PostgreSQL), with every guarantee the
// API gave in several: a repeated idempotency key is reported (0) and stores nothing; only the
// person who started the record adds to it, and only while it is underway or returned (the row is
// locked FOR SHARE, so a concurrent finish waits or is waited for); attempts of one step are
// numbered one at a time under an advisory lock per record and step (taken before the attempt is
// read: each statement of a PL/pgSQL function sees what committed before it began); photos must be
// the person's own and not on another record; the audit rows and the witness's signature are
// written in the same transaction. Problems are raised with SQLSTATE class SW, which the API maps to
// problem+json: SW404 no record, SW403 not the person's record, SW409 closed (message: its status),
// SW422 a photo that cannot be used (message: its id).
export const up: Migration['up'] = async ({ context: q }) => {
  await q.sequelize.query(`
    CREATE FUNCTION setwright_save_step(
      p_id uuid, p_record uuid, p_step varchar, p_values jsonb, p_evaluation jsonb, p_outcome enum_step_entries_outcome,
      p_note text, p_person uuid, p_witness uuid, p_witness_name text, p_at timestamptz, p_key uuid, p_photos uuid[]
    ) RETURNS integer LANGUAGE plpgsql AS $$
    DECLARE
      v_status enum_setup_records_status;
      v_owner uuid;
      v_attempt integer;
      v_photo record;
    BEGIN
      IF EXISTS (SELECT 1 FROM step_entries WHERE idempotency_key = p_key) THEN
        RETURN 0;
      END IF;
      SELECT status INTO v_status FROM setup_records WHERE id = p_record;
      IF NOT FOUND THEN
        RAISE EXCEPTION 'no record %', p_record USING ERRCODE = 'SW404';
      END IF;
      -- A returned record goes back to underway below: lock its row for that update at once.
      IF v_status = 'returned' THEN
        SELECT status, started_by_id INTO v_status, v_owner FROM setup_records WHERE id = p_record FOR UPDATE;
      ELSE
        SELECT status, started_by_id INTO v_status, v_owner FROM setup_records WHERE id = p_record FOR SHARE;
      END IF;
      IF v_owner <> p_person THEN
        RAISE EXCEPTION 'not the person''s record' USING ERRCODE = 'SW403';
      END IF;
      IF v_status NOT IN ('underway', 'returned') THEN
        RAISE EXCEPTION '%', v_status USING ERRCODE = 'SW409';
      END IF;
      PERFORM pg_advisory_xact_lock(hashtext(p_record::text || '/' || p_step));
      IF cardinality(p_photos) > 0 THEN
        PERFORM 1 FROM photos WHERE id = ANY (p_photos) ORDER BY id FOR UPDATE;
        FOR v_photo IN
          SELECT wanted.id AS wanted, ph.id AS found, ph.owner_id, ph.attached_record_id
            FROM unnest(p_photos) AS wanted(id) LEFT JOIN photos ph ON ph.id = wanted.id
        LOOP
          IF v_photo.found IS NULL OR v_photo.owner_id <> p_person
             OR (v_photo.attached_record_id IS NOT NULL AND v_photo.attached_record_id <> p_record) THEN
            RAISE EXCEPTION '%', v_photo.wanted USING ERRCODE = 'SW422';
          END IF;
        END LOOP;
        UPDATE photos SET attached_record_id = p_record, attached_at = p_at WHERE id = ANY (p_photos) AND attached_record_id IS NULL;
      END IF;
      SELECT coalesce(max(attempt), 0) + 1 INTO v_attempt FROM step_entries WHERE record_id = p_record AND step_id = p_step;
      INSERT INTO step_entries (id, record_id, step_id, attempt, values, evaluation, outcome, corrective_note,
                                entered_by_id, witnessed_by_id, witnessed_at, idempotency_key, created_at)
        VALUES (p_id, p_record, p_step, v_attempt, p_values, p_evaluation, p_outcome, p_note,
                p_person, p_witness, CASE WHEN p_witness IS NULL THEN NULL ELSE p_at END, p_key, p_at);
      IF v_status = 'returned' THEN
        UPDATE setup_records SET status = 'underway', updated_at = p_at WHERE id = p_record;
      END IF;
      INSERT INTO audit_events (at, actor_id, action, record_id, detail)
        VALUES (p_at, p_person, 'step.saved', p_record, jsonb_build_object('step', p_step, 'attempt', v_attempt, 'outcome', p_outcome::text));
      IF p_witness IS NOT NULL AND p_witness <> p_person THEN
        INSERT INTO signatures (id, record_id, signer_id, meaning, printed_name, signed_at, step_id, entry_id)
          VALUES (gen_random_uuid(), p_record, p_witness, 'witnessed', p_witness_name, p_at, p_step, p_id);
        INSERT INTO audit_events (at, actor_id, action, record_id, detail)
          VALUES (p_at, p_witness, 'step.witnessed', p_record, jsonb_build_object('step', p_step, 'attempt', v_attempt));
      END IF;
      RETURN v_attempt;
    END $$;
  `);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.sequelize.query('DROP FUNCTION IF EXISTS setwright_save_step(uuid, uuid, varchar, jsonb, jsonb, enum_step_entries_outcome, text, uuid, uuid, text, timestamptz, uuid, uuid[]);');
};
