import { randomUUID } from 'node:crypto';
import { QueryTypes, UniqueConstraintError, type Sequelize } from 'sequelize';
import { evaluateStep } from '../../../procedures/engine';
import type { RecordDetail, RecordState, RecordStatus, RecordSummary, StartRecordRequest, StepEntryRequest, StepEntryView } from '../../contracts/records';
import { AppError } from '../../lib/errors';
import type { AuthService } from '../auth/service';
import { Machine } from '../machines/model';
import { User } from '../people/model';
import type { Person } from '../people/repository';
import { procedureBody } from '../procedures/cache';
import { ProcedureVersion } from '../procedures/model';
import { audit } from '../../lib/audit';
import { Signature } from '../signoff/model';
import type { SignOffService } from '../signoff/service';
import type { Notifier } from '../mail/notifier';
import { machineSnapshot, SetupRecord, StepEntry } from './model';
import { checkValues } from './values';
import { entryRowView, entryView, recordState, recordSummary, type EntryRow } from './views';

const READERS = ['competent_person', 'auditor', 'workshop_admin'] as const;
const withParts = {
  include: [
    { model: Machine, as: 'machine' },
    { model: ProcedureVersion, as: 'procedureVersion', attributes: { exclude: ['body'] } },
    { model: User, as: 'startedBy' },
  ],
};
const entryPeople = {
  include: [
    { model: User, as: 'enteredBy' },
    { model: User, as: 'witnessedBy' },
  ],
};

interface RecordFacts {
  startedById: string;
  procedureVersionId: string;
  machineSpec: Record<string, unknown>;
}
const KNOWN_RECORDS = 5000;

/** Only the person who started a record adds to it, and only while it is underway or returned. */
function assertWritable(person: Person, startedById: string, status: RecordStatus) {
  if (startedById !== person.id) throw AppError.forbidden('Only the person who started this record can work on it.');
  if (status !== 'underway' && status !== 'returned') {
    throw AppError.conflict(`This record is ${status.replace(/_/g, ' ')} and can no longer be changed.`);
  }
}

/** Set-up records: start one on a machine, save each step as it is done, finish it for sign-off. */
export class RecordService {
  private signOff?: SignOffService;
  private readonly knownRecords = new Map<string, RecordFacts>();

  constructor(
    private readonly sequelize: Sequelize,
    private readonly auth: AuthService,
  ) {}

  private startCheck?: (machineId: string, procedureKey: string) => Promise<void>;

  /** A check made before a record starts (a tagged-out machine refuses most procedures); it throws to refuse. */
  useStartCheck(check: (machineId: string, procedureKey: string) => Promise<void>) {
    this.startCheck = check;
  }

  /** Finishing signs the record as performed, through the sign-off service. */
  useSignOff(signOff: SignOffService) {
    this.signOff = signOff;
  }

  private notifier?: Pick<Notifier, 'recordAwaitsSignOff'>;

  /** Competent persons are e-mailed when a record becomes ready for sign-off. */
  useNotifier(notifier: Pick<Notifier, 'recordAwaitsSignOff'>) {
    this.notifier = notifier;
  }

  /** Start a record pinned to the procedure's current approved version; a repeated client id returns the same record. */
  async start(person: Person, req: StartRecordRequest): Promise<{ record: RecordDetail; created: boolean }> {
    if (req.id) {
      const existing = await SetupRecord.findByPk(req.id, withParts);
      if (existing) {
        const same = existing.startedById === person.id && existing.machineId === req.machineId && existing.procedureVersion!.key === req.procedureKey;
        if (!same) throw AppError.conflict('A different record already has that id.');
        return { record: await this.detail(existing), created: false };
      }
    }
    const machine = await Machine.findByPk(req.machineId);
    if (!machine) throw new AppError(422, 'unknown-machine', 'No such machine', 'That machine is not in the register.', [{ pointer: '#/machineId', detail: 'Choose a machine from the register.' }]);
    const version = await ProcedureVersion.findOne({ where: { key: req.procedureKey, status: 'approved' } });
    if (!version) throw new AppError(422, 'unknown-procedure', 'No such procedure', 'There is no approved procedure with that key.', [{ pointer: '#/procedureKey', detail: 'Choose an approved procedure.' }]);
    if (version.machineKind !== machine.kind) {
      throw new AppError(422, 'wrong-machine-kind', 'Procedure does not fit this machine', `"${version.title}" is written for another kind of machine.`, [
        { pointer: '#/procedureKey', detail: 'Choose a procedure written for this machine.' },
      ]);
    }
    await this.startCheck?.(machine.id, version.key);
    const id = req.id ?? randomUUID();
    try {
      await this.sequelize.transaction(async (transaction) => {
        await SetupRecord.create(
          {
            id,
            machineId: machine.id,
            procedureVersionId: version.id,
            machineSpec: machine.spec,
            machineSnapshot: machineSnapshot(machine),
            status: 'underway',
            startedById: person.id,
          },
          { transaction },
        );
        await audit('record.started', person.id, id, { machine: machine.assetTag, procedure: `${version.key} v${version.version}` }, transaction);
      });
    } catch (err) {
      if (err instanceof UniqueConstraintError && req.id) return this.start(person, req);
      throw err;
    }
    return { record: await this.detail((await SetupRecord.findByPk(id, withParts))!), created: true };
  }

  async get(person: Person, id: string): Promise<RecordDetail>;
  async get(person: Person, id: string, opts: { withProcedure: false }): Promise<RecordState>;
  async get(person: Person, id: string, opts: { withProcedure: boolean } = { withProcedure: true }): Promise<RecordDetail | RecordState> {
    const record = await this.readable(person, id);
    return opts.withProcedure ? this.detail(record) : recordState(record, await this.entries(record.id));
  }

  /** The read rule of a record (its starter, or a competent person, auditor or admin), in one lean statement. */
  async assertReadable(person: Person, id: string): Promise<void> {
    const [row] = await this.sequelize.query<{ started_by_id: string }>('SELECT started_by_id FROM setup_records WHERE id = $1', { bind: [id], type: QueryTypes.SELECT });
    if (!row) throw AppError.notFound('There is no record with that id.');
    if (row.started_by_id !== person.id && !person.roles.some((r) => (READERS as readonly string[]).includes(r))) {
      throw AppError.forbidden('This record belongs to someone else.');
    }
  }

  /** Records the person may see: their own, or every record for competent persons, auditors and admins. */
  async list(person: Person, filter: { status?: string; mine?: boolean; machineId?: string }): Promise<RecordSummary[]> {
    const where: Record<string, unknown> = {};
    if (filter.status) where['status'] = filter.status;
    if (filter.machineId) where['machineId'] = filter.machineId;
    if (filter.mine || !person.roles.some((r) => (READERS as readonly string[]).includes(r))) where['startedById'] = person.id;
    const rows = await SetupRecord.findAll({ where, ...withParts, order: [['createdAt', 'DESC']], limit: 200 });
    return rows.map(recordSummary);
  }

  /**
   * Save one step as it stands now. The server judges it with the same maths the tablet used and
   * never trusts the client's figures. A repeated idempotency key returns the entry already saved.
   */
  async saveStep(person: Person, recordId: string, req: StepEntryRequest): Promise<{ entry: StepEntryView; created: boolean }> {
    const facts = await this.facts(recordId);
    if (!facts) {
      const replay = await this.replay(recordId, req);
      if (replay) return { entry: replay, created: false };
      throw AppError.notFound('There is no record with that id.');
    }
    if (facts.startedById !== person.id) throw AppError.forbidden('Only the person who started this record can work on it.');
    const body = await procedureBody(facts.procedureVersionId);
    const step = body.steps.find((s) => s.id === req.stepId);
    if (!step) throw new AppError(422, 'unknown-step', 'No such step', 'This procedure has no step with that id.', [{ pointer: '#/stepId', detail: 'Not a step of this procedure.' }]);
    const values = checkValues(step, req.values);
    const evaluation = evaluateStep(step, values, facts.machineSpec);
    if (!evaluation.complete) {
      throw new AppError(422, 'step-incomplete', 'The step is not finished', 'Fill in every reading and answer before saving the step.', evaluation.missing.map((id) => ({
        pointer: `#/values/${id}`,
        detail: 'This is needed to finish the step.',
      })));
    }
    const outcome = evaluation.outOfLimits ? 'out_of_limits' : 'done';
    if (outcome === 'out_of_limits' && !req.correctiveNote) {
      throw new AppError(422, 'corrective-note-needed', 'Out of limits: say what you did', 'A reading is outside its limits. Write what you did about it, then re-measure or finish the record as failed.', [
        { pointer: '#/correctiveNote', detail: 'Say what you found and what you did about it.' },
      ]);
    }
    const witness = step.powered ? await this.witnessFor(person, req) : null;
    const photoIds = step.inputs.filter((i) => i.type === 'photo').flatMap((i) => (values[i.id] as string[] | undefined) ?? []);

    // One statement does the rest (see migration 0010): replay check, the record's state, the
    // per-step lock, photos, the entry, the audit rows and the witness's signature.
    const id = randomUUID();
    const at = new Date();
    let attempt: number;
    try {
      const [row] = await this.sequelize.query<{ attempt: number }>(
        'SELECT setwright_save_step($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13) AS attempt',
        {
          bind: [id, recordId, step.id, JSON.stringify(values), JSON.stringify(evaluation), outcome, req.correctiveNote ?? null, person.id, witness?.id ?? null, witness?.displayName ?? null, at, req.idempotencyKey, photoIds],
          type: QueryTypes.SELECT,
        },
      );
      attempt = row!.attempt;
    } catch (err) {
      const code = (err as { original?: { code?: string; message?: string } }).original;
      if (err instanceof UniqueConstraintError || code?.code === '23505') attempt = 0;
      else if (code?.code === 'SW404') throw AppError.notFound('There is no record with that id.');
      else if (code?.code === 'SW403') throw AppError.forbidden('Only the person who started this record can work on it.');
      else if (code?.code === 'SW409') throw AppError.conflict(`This record is ${String(code.message).replace(/_/g, ' ')} and can no longer be changed.`);
      else if (code?.code === 'SW422') throw AppError.badRequest('A photo cannot be used here.', [{ pointer: '#/values', detail: `Photo ${code.message} is not one of your unattached photos.` }]);
      else throw err;
    }
    if (attempt === 0) {
      // The idempotency key was used already: answer with the entry saved the first time.
      const replay = await this.replay(recordId, req);
      if (replay) return { entry: replay, created: false };
      throw AppError.conflict('That idempotency key was already used.');
    }
    const entry: StepEntryView = {
      id,
      stepId: step.id,
      attempt,
      values,
      evaluation,
      outcome,
      correctiveNote: req.correctiveNote ?? null,
      enteredBy: { id: person.id, displayName: person.displayName },
      witnessedBy: witness ? { id: witness.id, displayName: witness.displayName } : null,
      witnessedAt: witness ? at.toISOString() : null,
      idempotencyKey: req.idempotencyKey,
      createdAt: at.toISOString(),
    };
    return { entry, created: true };
  }

  /**
   * What never changes about a record once started (who started it, its pinned procedure version and
   * the machine's specification as it stood), kept per process; null when there is no such record.
   */
  private async facts(recordId: string): Promise<RecordFacts | null> {
    const kept = this.knownRecords.get(recordId);
    if (kept) return kept;
    const [row] = await this.sequelize.query<{ started_by_id: string; procedure_version_id: string; machine_spec: Record<string, unknown> }>(
      'SELECT started_by_id, procedure_version_id, machine_spec FROM setup_records WHERE id = $1',
      { bind: [recordId], type: QueryTypes.SELECT },
    );
    if (!row) return null;
    const facts: RecordFacts = { startedById: row.started_by_id, procedureVersionId: row.procedure_version_id, machineSpec: row.machine_spec };
    if (this.knownRecords.size >= KNOWN_RECORDS) this.knownRecords.delete(this.knownRecords.keys().next().value!);
    this.knownRecords.set(recordId, facts);
    return facts;
  }

  /**
   * Finish: every step has a current entry; readings left out of limits mark the record failed, when
   * confirmed. The performer signs it as performed with their password.
   */
  async finish(person: Person, recordId: string, acceptFailed: boolean, password: string): Promise<RecordDetail> {
    const record = await this.writable(person, recordId);
    const entries = await StepEntry.findAll({ where: { recordId }, order: [['attempt', 'ASC']] });
    const latest = new Map(entries.map((e) => [e.stepId, e]));
    const steps = (await procedureBody(record.procedureVersionId)).steps;
    const undone = steps.filter((s) => !latest.has(s.id));
    if (undone.length) {
      throw new AppError(409, 'steps-not-done', 'Some steps are not done', `Finish these steps first: ${undone.map((s) => s.title).join('; ')}.`, undefined, {
        steps: undone.map((s) => s.id),
      });
    }
    const failed = steps.filter((s) => latest.get(s.id)!.outcome === 'out_of_limits');
    if (failed.length && !acceptFailed) {
      throw new AppError(409, 'out-of-limits', 'Readings are still out of limits', `Re-measure these steps, or finish the record as failed: ${failed.map((s) => s.title).join('; ')}.`, undefined, {
        steps: failed.map((s) => s.id),
      });
    }
    await this.signOff!.confirmPassword(person, password);
    await this.sequelize.transaction(async (transaction) => {
      const finishedAt = new Date();
      await record.update({ status: 'ready_for_signoff', result: failed.length ? 'failed' : 'passed', finishedAt }, { transaction });
      await Signature.create(
        { recordId, signerId: person.id, meaning: 'performed', printedName: person.displayName, signedAt: finishedAt, stepId: null, entryId: null },
        { transaction },
      );
      await audit('record.finished', person.id, recordId, { result: failed.length ? 'failed' : 'passed' }, transaction);
    });
    // After the commit; it logs its own failures and never throws.
    await this.notifier?.recordAwaitsSignOff(recordId);
    return this.get(person, recordId);
  }

  async void(person: Person, recordId: string, reason: string): Promise<RecordDetail> {
    const record = await this.loaded(recordId);
    const mayVoid = record.startedById === person.id || person.roles.includes('workshop_admin') || person.roles.includes('competent_person');
    if (!mayVoid) throw AppError.forbidden('Only the person who started a record, a competent person or a workshop admin may void it.');
    if (record.status !== 'underway' && record.status !== 'returned') throw AppError.conflict('Only a record that is underway or returned can be voided.');
    await record.update({ status: 'voided', voidReason: reason });
    await audit('record.voided', person.id, recordId, { reason });
    return this.get(person, recordId);
  }

  private async replay(recordId: string, req: StepEntryRequest): Promise<StepEntryView | null> {
    const existing = await StepEntry.findOne({ where: { idempotencyKey: req.idempotencyKey }, ...entryPeople });
    if (!existing) return null;
    if (existing.recordId !== recordId || existing.stepId !== req.stepId) {
      throw AppError.conflict('That idempotency key was already used for another step.');
    }
    return entryView(existing);
  }

  /** A competent person other than the performer, checked by their own password; or the performer if they are one. */
  private async witnessFor(person: Person, req: StepEntryRequest): Promise<Person> {
    if (person.roles.includes('competent_person') && !req.witness) return person;
    if (!req.witness) {
      throw new AppError(422, 'witness-needed', 'Power on — witness needed', 'This step runs with power on. A competent person must witness it and enter their own sign-in.', [
        { pointer: '#/witness/email', detail: 'A competent person enters their email here.' },
      ]);
    }
    const witness = await this.auth.checkCredentials(req.witness.email, req.witness.password);
    if (!witness) {
      throw new AppError(422, 'witness-not-accepted', 'Witness not accepted', 'That witness email and password do not match an active account.', [
        { pointer: '#/witness/password', detail: 'That email and password do not match an active account.' },
      ]);
    }
    if (witness.id === person.id) {
      throw new AppError(422, 'witness-not-accepted', 'Witness not accepted', 'You cannot witness your own step.', [
        { pointer: '#/witness/email', detail: 'Someone else must witness this step.' },
      ]);
    }
    if (!witness.roles.includes('competent_person')) {
      throw new AppError(422, 'witness-not-accepted', 'Witness not accepted', `${witness.displayName} is not a competent person.`, [
        { pointer: '#/witness/email', detail: 'The witness must be a competent person.' },
      ]);
    }
    return witness;
  }

  private async loaded(id: string): Promise<SetupRecord> {
    const record = await SetupRecord.findByPk(id, withParts);
    if (!record) throw AppError.notFound('There is no record with that id.');
    return record;
  }

  private async readable(person: Person, id: string): Promise<SetupRecord> {
    const record = await this.loaded(id);
    if (record.startedById !== person.id && !person.roles.some((r) => (READERS as readonly string[]).includes(r))) {
      throw AppError.forbidden('This record belongs to someone else.');
    }
    return record;
  }

  /** Only the person who started a record adds to it, and only while it is underway or returned. */
  private async writable(person: Person, id: string): Promise<SetupRecord> {
    const record = await this.loaded(id);
    assertWritable(person, record.startedById, record.status);
    return record;
  }

  private async detail(record: SetupRecord): Promise<RecordDetail> {
    const [entries, body] = await Promise.all([this.entries(record.id), procedureBody(record.procedureVersionId)]);
    return { ...recordState(record, entries), procedureBody: body };
  }

  /** Every attempt of every step, oldest first, with who entered and witnessed it: one statement, no model instances. */
  private async entries(recordId: string): Promise<StepEntryView[]> {
    const rows = await this.sequelize.query<EntryRow>(
      `SELECT e.id, e.step_id, e.attempt, e.values, e.evaluation, e.outcome, e.corrective_note, e.entered_by_id,
              eb.display_name AS entered_by_name, e.witnessed_by_id, wb.display_name AS witnessed_by_name,
              e.witnessed_at, e.idempotency_key, e.created_at
         FROM step_entries e
         LEFT JOIN users eb ON eb.id = e.entered_by_id
         LEFT JOIN users wb ON wb.id = e.witnessed_by_id
        WHERE e.record_id = $1
        ORDER BY e.created_at, e.attempt`,
      { bind: [recordId], type: QueryTypes.SELECT },
    );
    return rows.map(entryRowView);
  }
}
