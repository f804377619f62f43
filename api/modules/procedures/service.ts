import { Op, UniqueConstraintError, type Sequelize, type Transaction } from 'sequelize';
import { checkReferences } from '../../../procedures/check-references';
import { diffProcedures, type ProcedureDiff } from '../../../procedures/diff';
import { procedureSchema, type Procedure } from '../../../procedures/schema';
import type { ProcedureVersionDetail, ProcedureVersionSummary } from '../../contracts/procedures';
import type { PersonRef } from '../../contracts/records';
import type { Role } from '../../contracts/roles';
import { AppError, pointerFor, type FieldProblem } from '../../lib/errors';
import { User } from '../people/model';
import type { Person } from '../people/repository';
import { procedureChecksum } from './loader';
import { ProcedureVersion } from './model';

/** Roles that read every version (drafts and history); everyone else reads approved versions only. */
const READERS: readonly Role[] = ['workshop_admin', 'competent_person', 'auditor'];
const isReader = (person: Person) => person.roles.some((r) => READERS.includes(r));
const isAdmin = (person: Person) => person.roles.includes('workshop_admin');

/** Everything wrong with a procedure body: the schema's findings, then broken references. Empty when it is sound. */
export function procedureProblems(raw: unknown): { body: Procedure | null; problems: FieldProblem[] } {
  const parsed = procedureSchema.safeParse(raw);
  if (!parsed.success) {
    return { body: null, problems: parsed.error.issues.map((i) => ({ pointer: pointerFor(i.path), detail: i.message })) };
  }
  const problems = checkReferences(parsed.data).map((p) => ({ pointer: pointerFor(p.path), detail: p.message }));
  return { body: parsed.data, problems };
}

/** The procedure library: versions, drafts written in the app, differences, and approval by a second person. */
export class ProcedureService {
  constructor(private readonly sequelize: Sequelize) {}

  async list(person: Person, filter: { machineKind?: string; all?: boolean }): Promise<ProcedureVersionSummary[]> {
    const where: Record<string, unknown> = {};
    if (!(filter.all && isReader(person))) where['status'] = 'approved';
    if (filter.machineKind) where['machineKind'] = filter.machineKind;
    const rows = await ProcedureVersion.findAll({ where, order: [['title', 'ASC'], ['key', 'ASC'], ['version', 'DESC']] });
    return this.summaries(rows);
  }

  /** Every version of one procedure, newest first (approved only, for people who read approved versions only). */
  async versions(person: Person, key: string): Promise<ProcedureVersionSummary[]> {
    const where: Record<string, unknown> = { key };
    if (!isReader(person)) where['status'] = 'approved';
    const rows = await ProcedureVersion.findAll({ where, order: [['version', 'DESC']] });
    if (!rows.length) throw AppError.notFound('There is no procedure with that key.');
    return this.summaries(rows);
  }

  async get(person: Person, key: string, version: number): Promise<ProcedureVersionDetail> {
    return this.detail(await this.readable(person, key, version));
  }

  /** Copy the approved version (or the one named) into a new draft, numbered after the newest version. */
  async startDraft(person: Person, key: string, from?: number): Promise<ProcedureVersionDetail> {
    let created: ProcedureVersion;
    try {
      created = await this.sequelize.transaction(async (transaction) => {
        const rows = await ProcedureVersion.findAll({ where: { key }, order: [['version', 'DESC']], transaction });
        if (!rows.length) throw AppError.notFound('There is no procedure with that key.');
        const open = rows.find((r) => r.status === 'draft');
        if (open) throw this.draftOpen(open);
        const source = from === undefined ? rows.find((r) => r.status === 'approved') : rows.find((r) => r.version === from);
        if (!source) {
          if (from !== undefined) throw AppError.badRequest(`There is no version ${from} of this procedure.`, [{ pointer: '#/from', detail: 'Choose a version of this procedure.' }]);
          throw new AppError(409, 'nothing-to-copy', 'No approved version to copy', 'This procedure has no approved version. Name the version to copy.');
        }
        const version = rows[0]!.version + 1;
        const body: Procedure = { ...structuredClone(source.body), version };
        return ProcedureVersion.create(
          {
            key,
            version,
            title: body.title,
            machineKind: body.machineKind,
            status: 'draft',
            body,
            checksum: procedureChecksum(body),
            source: 'editor',
            authorId: person.id,
          },
          { transaction },
        );
      });
    } catch (err) {
      // Someone else started a draft of this procedure at the same moment.
      if (err instanceof UniqueConstraintError) {
        const open = await ProcedureVersion.findOne({ where: { key, status: 'draft' } });
        throw open ? this.draftOpen(open) : AppError.conflict('Another version of this procedure was made at the same moment. Try again.');
      }
      throw err;
    }
    return this.detail(created);
  }

  /**
   * Replace a draft's body. It must pass the same schema the pack files pass, name only maths
   * functions that exist, refer only to fields and values that exist, and keep its key and version.
   */
  async saveDraft(person: Person, key: string, version: number, raw: unknown): Promise<ProcedureVersionDetail> {
    const { body, problems } = procedureProblems(raw);
    const own = raw as { key?: unknown; version?: unknown } | null;
    if (own && typeof own === 'object') {
      if (own.key !== undefined && own.key !== key) problems.push({ pointer: '#/key', detail: `This draft is of "${key}"; the key cannot change.` });
      if (own.version !== undefined && own.version !== version) problems.push({ pointer: '#/version', detail: `This draft is version ${version}; the version number cannot change.` });
    }
    // Check the draft exists and may be edited before describing what is wrong with the new body.
    const saved = await this.sequelize.transaction(async (transaction) => {
      const row = await this.editable(person, key, version, transaction);
      if (problems.length || !body) throw AppError.badRequest('The procedure has mistakes in it. Nothing was saved.', problems);
      await row.update({ body, title: body.title, machineKind: body.machineKind, checksum: procedureChecksum(body) }, { transaction });
      return row;
    });
    return this.detail(saved);
  }

  /** Throw a draft away: its author or any workshop admin. */
  async deleteDraft(person: Person, key: string, version: number): Promise<void> {
    await this.sequelize.transaction(async (transaction) => {
      const row = await this.found(key, version, transaction);
      if (row.authorId !== person.id && !isAdmin(person)) throw AppError.forbidden('Only the draft’s author or a workshop admin can delete a draft.');
      if (row.status !== 'draft') throw this.notDraft(row);
      await row.destroy({ transaction });
    });
  }

  /** How a version differs from another (by default the current approved version), step by step. */
  async diff(person: Person, key: string, version: number, against?: number): Promise<ProcedureDiff> {
    const to = await this.readable(person, key, version);
    let from: ProcedureVersion | null;
    if (against === undefined) {
      from = await ProcedureVersion.findOne({ where: { key, status: 'approved' } });
      if (!from) throw new AppError(409, 'nothing-to-compare', 'Nothing to compare with', 'This procedure has no approved version. Name a version to compare with.');
    } else {
      from = await ProcedureVersion.findOne({ where: { key, version: against } });
      if (!from) throw AppError.badRequest(`There is no version ${against} of this procedure.`, [{ pointer: '#/query/against', detail: 'Choose a version of this procedure.' }]);
    }
    return diffProcedures(from.body, to.body);
  }

  /**
   * Approve a draft: a competent person or workshop admin who did not write it. In one
   * transaction the approved version is retired and the draft becomes the approved version, so
   * the next record started uses it; records already started keep the version they pinned.
   */
  async approve(person: Person, key: string, version: number): Promise<ProcedureVersionDetail> {
    const approved = await this.sequelize.transaction(async (transaction) => {
      const draft = await this.found(key, version, transaction, true);
      if (draft.status !== 'draft') throw this.notDraft(draft);
      if (draft.authorId === person.id) {
        throw AppError.forbidden('You wrote this draft, so someone else must approve it: a competent person or another workshop admin.');
      }
      const { problems } = procedureProblems(draft.body);
      if (problems.length) {
        throw new AppError(409, 'draft-has-mistakes', 'The draft has mistakes in it', 'The draft no longer passes the procedure checks. Correct it and save it before approving.', problems);
      }
      const current = await ProcedureVersion.findOne({ where: { key, status: 'approved' }, transaction, lock: transaction.LOCK.UPDATE });
      if (current && current.version > draft.version) {
        throw new AppError(409, 'newer-version-approved', 'A newer version is approved', `Version ${current.version} was approved after this draft was started. Delete this draft and start a new one from version ${current.version}.`);
      }
      if (current) await current.update({ status: 'retired' }, { transaction });
      await draft.update({ status: 'approved', approvedById: person.id, approvedAt: new Date() }, { transaction });
      return draft;
    });
    return this.detail(approved);
  }

  private draftOpen(open: ProcedureVersion): AppError {
    return new AppError(409, 'draft-already-open', 'A draft is already open', `Version ${open.version} of this procedure is already a draft. Finish, approve or delete it first.`, undefined, {
      draft: { key: open.key, version: open.version },
    });
  }

  private notDraft(row: ProcedureVersion): AppError {
    return new AppError(409, 'not-a-draft', 'Only drafts change', `Version ${row.version} is ${row.status}. Approved and retired versions never change; start a new draft instead.`);
  }

  private async found(key: string, version: number, transaction?: Transaction, lock = false): Promise<ProcedureVersion> {
    const row = await ProcedureVersion.findOne({ where: { key, version }, transaction, ...(lock && transaction ? { lock: transaction.LOCK.UPDATE } : {}) });
    if (!row) throw AppError.notFound('There is no such procedure version.');
    return row;
  }

  /** A version the person may read: any for readers; approved ones for everyone else (others look absent). */
  private async readable(person: Person, key: string, version: number): Promise<ProcedureVersion> {
    const row = await this.found(key, version);
    if (row.status !== 'approved' && !isReader(person)) throw AppError.notFound('There is no such procedure version.');
    return row;
  }

  /** A draft, locked for the update; only its author edits it, so whoever approves it has written none of it. */
  private async editable(person: Person, key: string, version: number, transaction: Transaction): Promise<ProcedureVersion> {
    const row = await this.found(key, version, transaction, true);
    if (row.status !== 'draft') throw this.notDraft(row);
    if (row.authorId !== person.id) {
      throw AppError.forbidden('Only the draft’s author edits it, so that the person who approves it has written none of it. Start your own draft once this one is approved or deleted.');
    }
    return row;
  }

  private async people(rows: ProcedureVersion[]): Promise<Map<string, PersonRef>> {
    const ids = [...new Set(rows.flatMap((r) => [r.authorId, r.approvedById]).filter((id): id is string => !!id))];
    if (!ids.length) return new Map();
    const users = await User.findAll({ where: { id: { [Op.in]: ids } }, attributes: ['id', 'displayName'] });
    return new Map(users.map((u) => [u.id, { id: u.id, displayName: u.displayName }]));
  }

  private async summaries(rows: ProcedureVersion[]): Promise<ProcedureVersionSummary[]> {
    const people = await this.people(rows);
    return rows.map((r) => summary(r, people));
  }

  private async detail(row: ProcedureVersion): Promise<ProcedureVersionDetail> {
    const people = await this.people([row]);
    return { ...summary(row, people), body: row.body };
  }
}

function summary(v: ProcedureVersion, people: Map<string, PersonRef>): ProcedureVersionSummary {
  const ref = (id: string | null | undefined) => (id ? (people.get(id) ?? { id, displayName: '' }) : null);
  return {
    id: v.id,
    key: v.key,
    version: v.version,
    title: v.title,
    machineKind: v.machineKind,
    status: v.status,
    checksum: v.checksum,
    source: v.source,
    author: ref(v.authorId),
    approvedBy: ref(v.approvedById),
    approvedAt: v.approvedAt ? v.approvedAt.toISOString() : null,
    createdAt: v.createdAt.toISOString(),
    updatedAt: v.updatedAt.toISOString(),
  };
}
