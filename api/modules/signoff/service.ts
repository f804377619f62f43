import { Op, type Sequelize, type Transaction } from 'sequelize';
import {
  SIGNATURE_MEANINGS,
  type AddendumView,
  type AuditEventView,
  type QueueItem,
  type RecordCheck,
  type SignOffDetail,
} from '../../contracts/signoff';
import { audit } from '../../lib/audit';
import { AppError } from '../../lib/errors';
import type { AuthService } from '../auth/service';
import type { Notifier } from '../mail/notifier';
import { Machine } from '../machines/model';
import { User } from '../people/model';
import type { Person } from '../people/repository';
import { ProcedureVersion } from '../procedures/model';
import { SetupRecord, StepEntry } from '../records/model';
import { recordSummary } from '../records/views';
import { buildRecordDocument, hashDocument } from './document';
import { AuditEvent, RecordAddendum, RecordReturn, Signature } from './model';

const withParts = {
  include: [
    { model: Machine, as: 'machine' },
    { model: ProcedureVersion, as: 'procedureVersion', attributes: { exclude: ['body'] } },
    { model: User, as: 'startedBy' },
  ],
};

/**
 * The locking half of a sign-off, inside the caller's transaction (the record is already locked and
 * ready for sign-off): the approved signature, the record hash over its canonical JSON and the link
 * to the machine's previous signed record. The demo seed signs its history through this too.
 */
export async function sealRecord(
  sequelize: Sequelize,
  record: SetupRecord,
  signer: Pick<Person, 'id' | 'displayName'>,
  signedAt: Date,
  transaction: Transaction,
): Promise<void> {
  // One signer at a time per machine, so the chain never forks.
  await sequelize.query('SELECT pg_advisory_xact_lock(hashtext(:machine))', { replacements: { machine: record.machineId }, transaction });
  const previous = await SetupRecord.findOne({
    where: { machineId: record.machineId, status: 'signed_off' },
    order: [['signedAt', 'DESC'], ['id', 'DESC']],
    transaction,
  });
  await Signature.create(
    { recordId: record.id, signerId: signer.id, meaning: 'approved', printedName: signer.displayName, signedAt, stepId: null, entryId: null },
    { transaction },
  );
  const doc = await buildRecordDocument(record.id, transaction);
  doc.record.status = 'signed_off';
  doc.record.signedAt = signedAt.toISOString();
  doc.previousHash = previous?.recordHash ?? null;
  const recordHash = hashDocument(doc);
  await record.update({ status: 'signed_off', signedAt, previousHash: doc.previousHash, recordHash }, { transaction });
  await AuditEvent.create({ action: 'record.signed_off', actorId: signer.id, recordId: record.id, detail: { recordHash, previousHash: doc.previousHash }, at: signedAt }, { transaction });
}

/** Sign-off by a competent person, the hash chain that locks a record, send-backs, addenda and record checks. */
export class SignOffService {
  private readonly afterSignOff: ((recordId: string) => Promise<void>)[] = [];

  constructor(
    private readonly sequelize: Sequelize,
    private readonly auth: AuthService,
  ) {}

  private notifier?: Pick<Notifier, 'recordReturned'>;

  /** The performer is e-mailed when their record is sent back. */
  useNotifier(notifier: Pick<Notifier, 'recordReturned'>) {
    this.notifier = notifier;
  }

  /** Work to do once a sign-off has committed (rendering the PDF); it never undoes the signature. */
  whenSignedOff(hook: (recordId: string) => Promise<void>) {
    this.afterSignOff.push(hook);
  }

  /** Records waiting for a signature, newest first, with what stands out. */
  async queue(): Promise<QueueItem[]> {
    const rows = await SetupRecord.findAll({ where: { status: 'ready_for_signoff' }, ...withParts, order: [['finishedAt', 'DESC']] });
    const entries = await StepEntry.findAll({ where: { recordId: { [Op.in]: rows.map((r) => r.id) } }, attributes: ['recordId', 'stepId', 'attempt', 'outcome', 'witnessedById'] });
    return rows.map((r) => {
      const latest = new Map<string, StepEntry>();
      for (const e of entries.filter((e) => e.recordId === r.id)) {
        const seen = latest.get(e.stepId);
        if (!seen || seen.attempt < e.attempt) latest.set(e.stepId, e);
      }
      const current = [...latest.values()];
      return {
        ...recordSummary(r),
        outOfLimitsSteps: current.filter((e) => e.outcome === 'out_of_limits').length,
        witnessedSteps: current.filter((e) => e.witnessedById).length,
      };
    });
  }

  /**
   * Approve and lock: the signer re-enters their password; an approved signature is added; the record's
   * canonical JSON is hashed and chained to the previous signed record of the same machine.
   */
  async signOff(person: Person, recordId: string, password: string): Promise<SignOffDetail> {
    await this.confirmPassword(person, password);
    const record = await SetupRecord.findByPk(recordId);
    if (!record) throw AppError.notFound('There is no record with that id.');
    if (record.startedById === person.id) throw AppError.forbidden('You performed this record; another competent person must sign it off.');
    await this.sequelize.transaction(async (transaction) => {
      const locked = await SetupRecord.findByPk(recordId, { transaction, lock: transaction.LOCK.UPDATE });
      if (locked!.status !== 'ready_for_signoff') throw AppError.conflict('Only a record that is ready for sign-off can be signed off.');
      await sealRecord(this.sequelize, locked!, person, new Date(), transaction);
    });
    // The signature stands whatever happens here: each hook logs its own failures.
    for (const hook of this.afterSignOff) await hook(recordId).catch(() => undefined);
    return this.detail(recordId);
  }

  /** Send a record back to its performer with a reason; their corrections are new attempts, so both versions stay. */
  async sendBack(person: Person, recordId: string, reason: string): Promise<SignOffDetail> {
    await this.sequelize.transaction(async (transaction) => {
      const record = await SetupRecord.findByPk(recordId, { transaction, lock: transaction.LOCK.UPDATE });
      if (!record) throw AppError.notFound('There is no record with that id.');
      if (record.status !== 'ready_for_signoff') throw AppError.conflict('Only a record that is ready for sign-off can be sent back.');
      if (record.startedById === person.id) throw AppError.forbidden('You performed this record; another competent person must review it.');
      await RecordReturn.create({ recordId, returnedById: person.id, reason, returnedAt: new Date() }, { transaction });
      await record.update({ status: 'returned', result: null, finishedAt: null }, { transaction });
      await audit('record.returned', person.id, recordId, { reason }, transaction);
    });
    // After the commit; it logs its own failures and never throws.
    await this.notifier?.recordReturned(recordId, reason, person.displayName);
    return this.detail(recordId);
  }

  /** A signed addendum to a locked record: the only way to correct it afterwards. */
  async addAddendum(person: Person, recordId: string, text: string, password: string): Promise<AddendumView> {
    await this.confirmPassword(person, password);
    const record = await SetupRecord.findByPk(recordId);
    if (!record) throw AppError.notFound('There is no record with that id.');
    if (record.status !== 'signed_off') throw AppError.conflict('Addenda are for signed-off records; change an open record directly.');
    const signedAt = new Date();
    const addendumHash = hashDocument({ recordHash: record.recordHash, text, author: person.id, printedName: person.displayName, signedAt: signedAt.toISOString() });
    const row = await RecordAddendum.create({ recordId, authorId: person.id, printedName: person.displayName, text, signedAt, addendumHash });
    await audit('record.addendum', person.id, recordId, { addendumId: row.id, addendumHash });
    return { id: row.id, printedName: row.printedName, text: row.text, signedAt: row.signedAt.toISOString(), addendumHash };
  }

  async detail(recordId: string): Promise<SignOffDetail> {
    const record = await SetupRecord.findByPk(recordId);
    if (!record) throw AppError.notFound('There is no record with that id.');
    const [signatures, returns, addenda] = await Promise.all([
      Signature.findAll({ where: { recordId }, order: [['signedAt', 'ASC']] }),
      RecordReturn.findAll({ where: { recordId }, order: [['returnedAt', 'ASC']] }),
      RecordAddendum.findAll({ where: { recordId }, order: [['signedAt', 'ASC']] }),
    ]);
    const names = await this.names(returns.map((r) => r.returnedById));
    return {
      signatures: signatures.map((s) => ({
        id: s.id,
        meaning: s.meaning,
        meaningLabel: SIGNATURE_MEANINGS[s.meaning],
        printedName: s.printedName,
        signerId: s.signerId,
        signedAt: s.signedAt.toISOString(),
        stepId: s.stepId,
      })),
      returns: returns.map((r) => ({ reason: r.reason, returnedBy: names.get(r.returnedById) ?? '', returnedAt: r.returnedAt.toISOString() })),
      addenda: addenda.map((a) => ({ id: a.id, printedName: a.printedName, text: a.text, signedAt: a.signedAt.toISOString(), addendumHash: a.addendumHash })),
      recordHash: record.recordHash,
      previousHash: record.previousHash,
      signedAt: record.signedAt ? record.signedAt.toISOString() : null,
    };
  }

  /** Recompute the record's hash from what is stored, and check its link to the machine's previous signed record. */
  async check(recordId: string, actorId: string | null): Promise<RecordCheck> {
    const record = await SetupRecord.findByPk(recordId);
    if (!record) throw AppError.notFound('There is no record with that id.');
    const checks: RecordCheck['checks'] = [];
    let computedHash: string | null = null;
    let expectedPrevious: string | null = null;
    if (record.status !== 'signed_off' || !record.recordHash) {
      checks.push({ name: 'Signed off', ok: false, detail: 'This record is not signed off, so it has no record hash yet.' });
    } else {
      computedHash = hashDocument(await buildRecordDocument(recordId));
      const same = computedHash === record.recordHash;
      checks.push({
        name: 'Content matches its hash',
        ok: same,
        detail: same
          ? 'The record, its entries, photos and signatures are exactly as they were signed.'
          : 'What is stored now does not match the hash made at sign-off: something was changed after signing.',
      });
      const previous = await SetupRecord.findOne({
        where: { machineId: record.machineId, status: 'signed_off', signedAt: { [Op.lt]: record.signedAt! } },
        order: [['signedAt', 'DESC'], ['id', 'DESC']],
      });
      expectedPrevious = previous?.recordHash ?? null;
      const linked = expectedPrevious === record.previousHash;
      checks.push({
        name: 'Linked to the machine’s previous record',
        ok: linked,
        detail: linked
          ? previous
            ? 'It points at the hash of the record signed before it on this machine.'
            : 'It is the first signed record of this machine.'
          : 'Its link does not match the record signed before it on this machine: the chain is broken.',
      });
      if (previous?.recordHash) {
        const previousIntact = hashDocument(await buildRecordDocument(previous.id)) === previous.recordHash;
        checks.push({
          name: 'Previous record intact',
          ok: previousIntact,
          detail: previousIntact ? 'The record it points at also still matches its own hash.' : 'The record it points at no longer matches its own hash.',
        });
      }
    }
    await audit('record.checked', actorId, recordId, { intact: checks.every((c) => c.ok) });
    return {
      recordId,
      intact: checks.every((c) => c.ok),
      checks,
      storedHash: record.recordHash,
      computedHash,
      previousHash: record.previousHash,
      expectedPreviousHash: expectedPrevious,
      checkedAt: new Date().toISOString(),
    };
  }

  async auditTrail(recordId: string): Promise<AuditEventView[]> {
    const events = await AuditEvent.findAll({ where: { recordId }, order: [['at', 'ASC'], ['id', 'ASC']] });
    const names = await this.names(events.map((e) => e.actorId).filter((x): x is string => !!x));
    return events.map((e) => ({ id: String(e.id), at: e.at.toISOString(), action: e.action, actor: e.actorId ? (names.get(e.actorId) ?? null) : null, detail: e.detail }));
  }

  private async names(ids: string[]): Promise<Map<string, string>> {
    if (!ids.length) return new Map();
    const users = await User.findAll({ where: { id: { [Op.in]: [...new Set(ids)] } }, attributes: ['id', 'displayName'] });
    return new Map(users.map((u) => [u.id, u.displayName]));
  }

  /** Two-part signature: the signed-in person re-enters their own password (21 CFR 11.200(a)(1)). */
  async confirmPassword(person: Person, password: string): Promise<void> {
    const checked = await this.auth.checkCredentials(person.email, password);
    if (!checked || checked.id !== person.id) {
      throw new AppError(422, 'signature-not-accepted', 'Signature not accepted', 'That password is not right. Your signature needs your own password.', [
        { pointer: '#/password', detail: 'That password is not right.' },
      ]);
    }
  }
}
