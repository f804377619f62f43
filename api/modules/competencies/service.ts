import { Op, QueryTypes, type Sequelize } from 'sequelize';
import {
  EXPIRING_WITHIN_DAYS,
  LONGEST_AUTHORISATION_YEARS,
  type AuthorisationState,
  type AuthorisationView,
  type CompetencyCell,
  type CompetencyMatrix,
  type GrantRequest,
  type MatrixProcedure,
} from '../../contracts/competencies';
import type { Role } from '../../contracts/roles';
import { AppError } from '../../lib/errors';
import type { AuthService } from '../auth/service';
import { RoleAssignment, User } from '../people/model';
import { findPersonById, type Person } from '../people/repository';
import { Authorisation } from './model';

/** Today's date (YYYY-MM-DD) in the workshop's time zone: expiry dates are judged against the workshop's calendar. */
export function workshopDate(timeZone: string, at: Date = new Date()): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(at);
}

const dayMs = 86_400_000;
const utcDay = (isoDate: string) => Date.UTC(Number(isoDate.slice(0, 4)), Number(isoDate.slice(5, 7)) - 1, Number(isoDate.slice(8, 10)));

/** A date n days after another (both YYYY-MM-DD). */
export function addDays(isoDate: string, days: number): string {
  return new Date(utcDay(isoDate) + days * dayMs).toISOString().slice(0, 10);
}

/** Whole days from `today` to `expiresOn`: 0 on the last valid day, negative once it has passed. */
export function daysUntil(today: string, expiresOn: string): number {
  return Math.round((utcDay(expiresOn) - utcDay(today)) / dayMs);
}

/** Expired after its last day; expiring when it ends within the warning window (inclusive); current otherwise. */
export function authorisationState(today: string, expiresOn: string, withinDays = EXPIRING_WITHIN_DAYS): { state: AuthorisationState; daysLeft: number } {
  const daysLeft = daysUntil(today, expiresOn);
  return { state: daysLeft < 0 ? 'expired' : daysLeft <= withinDays ? 'expiring' : 'current', daysLeft };
}

const RUNNER_ROLES: readonly Role[] = ['trainee', 'competent_person'];
const ref = (u: User | null | undefined) => (u ? { id: u.id, displayName: u.displayName } : null);
const withPeople = {
  include: [
    { model: User, as: 'person' },
    { model: User, as: 'grantedBy' },
    { model: User, as: 'endedBy' },
  ],
};

interface RunCounts {
  personId: string;
  procedureKey: string;
  witnessedRuns: number;
  signedRuns: number;
  lastSignedAt: Date | null;
}

/** An authorisation close to expiry, with the holder's email, for reminders. */
export interface ExpiringAuthorisation extends AuthorisationView {
  personEmail: string;
}

/** Procedures that people can have run: every key with an approved or retired version, titled by its latest. */
async function procedureTitles(sequelize: Sequelize): Promise<MatrixProcedure[]> {
  const rows = await sequelize.query<MatrixProcedure>(
    `SELECT DISTINCT ON (key) key, title FROM procedure_versions WHERE status <> 'draft' ORDER BY key, version DESC`,
    { type: QueryTypes.SELECT },
  );
  return rows.sort((a, b) => a.title.localeCompare(b.title) || a.key.localeCompare(b.key));
}

function toView(a: Authorisation, today: string, titles: Map<string, string>): AuthorisationView {
  const { state, daysLeft } = authorisationState(today, a.expiresOn);
  return {
    id: a.id,
    person: ref(a.person) ?? { id: a.personId, displayName: '' },
    procedureKey: a.procedureKey,
    procedureTitle: titles.get(a.procedureKey) ?? a.procedureKey,
    grantedBy: ref(a.grantedBy) ?? { id: a.grantedById, displayName: '' },
    grantedAt: a.grantedAt.toISOString(),
    expiresOn: a.expiresOn,
    note: a.note,
    state,
    daysLeft,
    endedAt: a.endedAt ? a.endedAt.toISOString() : null,
    endedBy: ref(a.endedBy),
    endKind: a.endKind,
    endReason: a.endReason,
  };
}

/**
 * Authorisations still open that end within `withinDays` of `today` (and have not ended yet), soonest
 * first. For reminder e-mails; `today` is the workshop's date (see workshopDate).
 */
export async function listExpiringAuthorisations(sequelize: Sequelize, today: string, withinDays = EXPIRING_WITHIN_DAYS): Promise<ExpiringAuthorisation[]> {
  const rows = await Authorisation.findAll({
    where: { endedAt: null, expiresOn: { [Op.between]: [today, addDays(today, withinDays)] } },
    ...withPeople,
    order: [['expiresOn', 'ASC'], ['grantedAt', 'ASC']],
  });
  const titles = new Map((await procedureTitles(sequelize)).map((p) => [p.key, p.title]));
  return rows.map((a) => ({ ...toView(a, today, titles), personEmail: a.person?.email ?? '' }));
}

/**
 * Competencies: what each person has run (witnessed and signed records) and the authorisations competent
 * persons grant from them, with an expiry date (29 CFR 1910.147 (c)(7)(iv); PUWER reg 9).
 */
export class CompetencyService {
  constructor(
    private readonly sequelize: Sequelize,
    private readonly auth: AuthService,
    private readonly timeZone: string,
    private readonly now: () => Date = () => new Date(),
  ) {}

  /** Today in the workshop's time zone, by the app's clock. */
  today(): string {
    return workshopDate(this.timeZone, this.now());
  }

  /** Run counts per person and procedure key. Voided records count for nothing. */
  async runCounts(personId?: string): Promise<RunCounts[]> {
    return this.sequelize.query<RunCounts>(
      `SELECT r.started_by_id AS "personId", pv.key AS "procedureKey",
              (COUNT(*) FILTER (WHERE EXISTS (
                 SELECT 1 FROM step_entries e
                 WHERE e.record_id = r.id AND e.witnessed_by_id IS NOT NULL AND e.witnessed_by_id <> r.started_by_id)))::int AS "witnessedRuns",
              (COUNT(*) FILTER (WHERE r.status = 'signed_off'))::int AS "signedRuns",
              MAX(r.signed_at) AS "lastSignedAt"
         FROM setup_records r
         JOIN procedure_versions pv ON pv.id = r.procedure_version_id
        WHERE r.status <> 'voided' ${personId ? 'AND r.started_by_id = :personId' : ''}
        GROUP BY r.started_by_id, pv.key`,
      { type: QueryTypes.SELECT, replacements: { personId: personId ?? null } },
    );
  }

  /** People who run procedures × procedures, with run counts and the authorisation each holds. */
  async matrix(today = this.today()): Promise<CompetencyMatrix> {
    const [procedures, counts, open] = await Promise.all([
      procedureTitles(this.sequelize),
      this.runCounts(),
      Authorisation.findAll({ where: { endedAt: null }, ...withPeople }),
    ]);
    const titles = new Map(procedures.map((p) => [p.key, p.title]));
    const holders = new Set(open.map((a) => a.personId));
    const users = await User.findAll({
      where: { active: true },
      include: [{ model: RoleAssignment, as: 'roleAssignments' }],
      order: [['displayName', 'ASC'], ['email', 'ASC']],
    });
    const people = users.filter((u) => holders.has(u.id) || (u.roleAssignments ?? []).some((r) => RUNNER_ROLES.includes(r.role)));
    const cells = new Map<string, Record<string, CompetencyCell>>();
    const cell = (personId: string, key: string): CompetencyCell => {
      const row = cells.get(personId) ?? {};
      cells.set(personId, row);
      return (row[key] ??= { witnessedRuns: 0, signedRuns: 0, lastSignedAt: null, authorisation: null });
    };
    for (const c of counts) {
      const target = cell(c.personId, c.procedureKey);
      target.witnessedRuns = c.witnessedRuns;
      target.signedRuns = c.signedRuns;
      target.lastSignedAt = c.lastSignedAt ? new Date(c.lastSignedAt).toISOString() : null;
    }
    for (const a of open) cell(a.personId, a.procedureKey).authorisation = toView(a, today, titles);
    return {
      today,
      expiringWithinDays: EXPIRING_WITHIN_DAYS,
      procedures,
      rows: people.map((u) => ({
        person: { id: u.id, displayName: u.displayName, email: u.email, roles: (u.roleAssignments ?? []).map((r) => r.role).sort() },
        cells: cells.get(u.id) ?? {},
      })),
    };
  }

  /** Every authorisation, ended ones included, newest first. */
  async history(filter: { personId?: string; procedureKey?: string }, today = this.today()): Promise<AuthorisationView[]> {
    const where: Record<string, unknown> = {};
    if (filter.personId) where['personId'] = filter.personId;
    if (filter.procedureKey) where['procedureKey'] = filter.procedureKey;
    const rows = await Authorisation.findAll({ where, ...withPeople, order: [['grantedAt', 'DESC']], limit: 500 });
    const titles = new Map((await procedureTitles(this.sequelize)).map((p) => [p.key, p.title]));
    return rows.map((a) => toView(a, today, titles));
  }

  async expiring(withinDays = EXPIRING_WITHIN_DAYS, today = this.today()): Promise<ExpiringAuthorisation[]> {
    return listExpiringAuthorisations(this.sequelize, today, withinDays);
  }

  /**
   * A competent person authorises someone else to run a procedure until a date, signing with their own
   * password. An authorisation already open for the same person and procedure ends as renewed.
   */
  async grant(granter: Person, req: GrantRequest, today = this.today()): Promise<AuthorisationView> {
    const field = (pointer: string, slug: string, title: string, detail: string) => new AppError(422, slug, title, detail, [{ pointer, detail }]);
    if (req.personId === granter.id) {
      throw field('#/personId', 'self-authorisation', 'You cannot authorise yourself', 'Another competent person must authorise you.');
    }
    const holder = await findPersonById(req.personId);
    if (!holder || !holder.active) throw field('#/personId', 'unknown-person', 'No such person', 'Choose an active person.');
    if (!holder.roles.some((r) => RUNNER_ROLES.includes(r))) {
      throw field('#/personId', 'not-a-runner', 'This person does not run procedures', `${holder.displayName} is not a trainee or competent person.`);
    }
    const procedure = (await procedureTitles(this.sequelize)).find((p) => p.key === req.procedureKey);
    if (!procedure) throw field('#/procedureKey', 'unknown-procedure', 'No such procedure', 'Choose a procedure from the library.');
    const latest = addDays(today, Math.round(LONGEST_AUTHORISATION_YEARS * 365.25));
    if (req.expiresOn <= today) throw AppError.badRequest('The expiry date must be in the future.', [{ pointer: '#/expiresOn', detail: `Choose a date after today (${today}).` }]);
    if (req.expiresOn > latest) {
      throw AppError.badRequest('The expiry date is too far ahead.', [{ pointer: '#/expiresOn', detail: `An authorisation runs at most ${LONGEST_AUTHORISATION_YEARS} years: choose a date by ${latest}.` }]);
    }
    const signer = await this.auth.checkCredentials(granter.email, req.password);
    if (!signer || signer.id !== granter.id) {
      throw new AppError(422, 'signature-not-accepted', 'Signature not accepted', 'That password is not right. Your signature needs your own password.', [
        { pointer: '#/password', detail: 'That password is not right.' },
      ]);
    }
    const id = await this.sequelize.transaction(async (transaction) => {
      const now = new Date();
      const open = await Authorisation.findOne({ where: { personId: holder.id, procedureKey: procedure.key, endedAt: null }, transaction, lock: transaction.LOCK.UPDATE });
      if (open) {
        await open.update({ endedAt: now, endedById: granter.id, endKind: 'renewed', endReason: `Renewed until ${req.expiresOn}.` }, { transaction });
      }
      const row = await Authorisation.create(
        { personId: holder.id, procedureKey: procedure.key, grantedById: granter.id, grantedAt: now, expiresOn: req.expiresOn, note: req.note || null },
        { transaction },
      );
      return row.id;
    });
    return this.one(id, today);
  }

  /** Withdraw an authorisation, with the reason; it stays in the history. */
  async revoke(person: Person, id: string, reason: string, today = this.today()): Promise<AuthorisationView> {
    await this.sequelize.transaction(async (transaction) => {
      const row = await Authorisation.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
      if (!row) throw AppError.notFound('There is no authorisation with that id.');
      if (row.endedAt) throw AppError.conflict(`This authorisation already ended (${row.endKind}).`);
      await row.update({ endedAt: new Date(), endedById: person.id, endKind: 'revoked', endReason: reason }, { transaction });
    });
    return this.one(id, today);
  }

  private async one(id: string, today: string): Promise<AuthorisationView> {
    const row = await Authorisation.findByPk(id, withPeople);
    if (!row) throw AppError.notFound('There is no authorisation with that id.');
    const titles = new Map((await procedureTitles(this.sequelize)).map((p) => [p.key, p.title]));
    return toView(row, today, titles);
  }
}
