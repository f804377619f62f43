import type { Logger } from 'pino';
import type { Transaction } from 'sequelize';
import type { Config } from '../../config';
import { ROLE_LABELS, type Role } from '../../contracts/roles';
import { workshopDate } from '../competencies/service';
import { Machine } from '../machines/model';
import { User } from '../people/model';
import { activePeopleWithRoles, findPersonById } from '../people/repository';
import { ProcedureVersion } from '../procedures/model';
import { SetupRecord } from '../records/model';
import * as letters from './messages';
import type { DueItem, LetterContext, RecordFacts } from './messages';
import type { Outbox, OutgoingMessage } from './outbox';

export type { DueItem } from './messages';

/** A machine as the tag-out e-mail needs it (a Machine row will do). */
export interface TaggedOutMachine {
  id: string;
  name: string;
  assetTag: string;
  location?: string | null;
}

/** An authorisation ending soon: who holds it, on what, and how many days are left. */
export interface ExpiringItem {
  personId: string;
  procedureTitle: string;
  expiresOn: string;
  daysLeft: number;
}

/** Authorisations ending soon. */
export type ExpiringSource = () => Promise<ExpiringItem[]>;

/** Where the daily "due this week" e-mail gets its list; the schedules module supplies it with useDueThisWeek(). */
export type DueThisWeekSource = () => Promise<DueItem[]>;

/**
 * Who hears about what, and in which words. Every e-mail goes through the outbox.
 *
 * For other modules (each method queues and returns the outbox ids; none throws, so a
 * notification can never undo the work it tells of; failures are logged):
 * - `recordAwaitsSignOff(recordId)` — to every active competent person but the performer (RecordService.finish).
 * - `recordReturned(recordId, reason, reviewer)` — to the performer, with the reason (SignOffService.sendBack).
 * - `notifyTaggedOut(machine, record)` — to every active workshop admin; call it after the tag-out commits.
 * - `notifyAuthorisationExpiring({ person, procedureTitle, expiresOn })` — to the person whose authorisation ends.
 * - `sendWeeklyDue(items)` — the "due this week" list to every active workshop admin and competent person.
 *   It also runs daily by itself (MAIL_DUE_CRON, 06:00 workshop time by default) with the items from the
 *   source given to `useDueThisWeek(source)`; with no source, or nothing due, it sends nothing.
 * - `sendDaily(day)` — that daily job: the due list and the expiry reminders, queued at most once a workshop day.
 * - `invitation(...)` — the message for PeopleService to queue inside its own transaction.
 */
export class Notifier {
  private dueSource: DueThisWeekSource = async () => [];
  private expiringSource: ExpiringSource = async () => [];

  constructor(
    private readonly outbox: Outbox,
    private readonly config: Config,
    private readonly logger: Logger,
  ) {
    void outbox.schedule('due-this-week', config.MAIL_DUE_CRON, async () => {
      await this.sendDaily();
    });
  }

  /** The authorisations behind the daily reminder; the competencies module supplies them. */
  useExpiringAuthorisations(source: ExpiringSource) {
    this.expiringSource = source;
  }

  /**
   * Remind each holder once 30 days before their authorisation ends and again 7 days before
   * (the daily job runs once a day, so each day-count is met once).
   */
  async sendExpiringReminders(items: ExpiringItem[]): Promise<string[]> {
    return this.safely('authorisation expiring', async () => this.outbox.send(await this.expiringMessages(items)));
  }

  /**
   * The daily job: the "due this week" list and the expiry reminders, queued in one batch at most
   * once for each workshop day (YYYY-MM-DD in WORKSHOP_TIME_ZONE), however many API instances run
   * it and however often it is retried. A day with nothing to send uses up nothing, so a later run
   * that day still sends. Failures are thrown, so the job queue tries again.
   */
  async sendDaily(day = workshopDate(this.config.WORKSHOP_TIME_ZONE)): Promise<string[]> {
    const messages = [...(await this.dueMessages(await this.dueSource())), ...(await this.expiringMessages(await this.expiringSource()))];
    return this.outbox.sendOnce(`daily:${day}`, messages);
  }

  /** The list behind the daily "due this week" e-mail. */
  useDueThisWeek(source: DueThisWeekSource) {
    this.dueSource = source;
  }

  get context(): LetterContext {
    return {
      workshop: this.config.WORKSHOP_NAME,
      publicUrl: (this.config.PUBLIC_URL ?? `http://${this.config.HOST}:${this.config.PORT}`).replace(/\/+$/, ''),
      timeZone: this.config.WORKSHOP_TIME_ZONE,
    };
  }

  async recordAwaitsSignOff(recordId: string): Promise<string[]> {
    return this.safely('record awaits sign-off', async () => {
      const facts = await this.recordFacts(recordId);
      if (!facts) return [];
      const people = (await activePeopleWithRoles(['competent_person'])).filter((p) => p.id !== facts.performerId);
      return this.outbox.send(
        people.map((p) => ({
          kind: 'awaiting_sign_off',
          to: { email: p.email, name: p.displayName },
          letter: letters.awaitingSignOff(this.context, p.displayName, facts),
          recordId,
        })),
      );
    });
  }

  async recordReturned(recordId: string, reason: string, reviewer: string): Promise<string[]> {
    return this.safely('record returned', async () => {
      const facts = await this.recordFacts(recordId);
      if (!facts) return [];
      const performer = await findPersonById(facts.performerId);
      if (!performer || !performer.active) return [];
      return this.outbox.send([
        {
          kind: 'record_returned',
          to: { email: performer.email, name: performer.displayName },
          letter: letters.recordReturned(this.context, performer.displayName, facts, reviewer, reason),
          recordId,
        },
      ]);
    });
  }

  async notifyTaggedOut(machine: TaggedOutMachine, record: { id: string } | null): Promise<string[]> {
    return this.safely('machine tagged out', async () => {
      const facts = record ? await this.recordFacts(record.id) : null;
      const admins = await activePeopleWithRoles(['workshop_admin']);
      const about = facts ? { id: facts.id, procedureTitle: facts.procedureTitle, performer: facts.performer } : record ? { id: record.id, procedureTitle: null, performer: null } : null;
      return this.outbox.send(
        admins.map((p) => ({
          kind: 'machine_tagged_out',
          to: { email: p.email, name: p.displayName },
          letter: letters.machineTaggedOut(this.context, p.displayName, machine, about),
          recordId: record?.id ?? null,
        })),
      );
    });
  }

  async sendWeeklyDue(items: DueItem[]): Promise<string[]> {
    return this.safely('due this week', async () => this.outbox.send(await this.dueMessages(items)));
  }

  async notifyAuthorisationExpiring(a: { person: { id: string }; procedureTitle: string; expiresOn: Date | string }): Promise<string[]> {
    return this.safely('authorisation expiring', async () => this.outbox.send(await this.expiringMessage(a)));
  }

  /** The "due this week" list for every active workshop admin and competent person (none when nothing is due). */
  private async dueMessages(items: DueItem[]): Promise<OutgoingMessage[]> {
    if (!items.length) return [];
    const sorted = [...items].sort((a, b) => new Date(a.dueOn).getTime() - new Date(b.dueOn).getTime());
    const people = await activePeopleWithRoles(['workshop_admin', 'competent_person']);
    return people.map((p) => ({ kind: 'due_this_week', to: { email: p.email, name: p.displayName }, letter: letters.dueThisWeek(this.context, p.displayName, sorted) }));
  }

  /** The reminders for authorisations that end in exactly 30 or 7 days. */
  private async expiringMessages(items: ExpiringItem[]): Promise<OutgoingMessage[]> {
    const due = items.filter((i) => i.daysLeft === 30 || i.daysLeft === 7);
    const out: OutgoingMessage[] = [];
    for (const i of due) out.push(...(await this.expiringMessage({ person: { id: i.personId }, procedureTitle: i.procedureTitle, expiresOn: i.expiresOn })));
    return out;
  }

  private async expiringMessage(a: { person: { id: string }; procedureTitle: string; expiresOn: Date | string }): Promise<OutgoingMessage[]> {
    const person = await findPersonById(a.person.id);
    if (!person || !person.active) return [];
    return [
      {
        kind: 'authorisation_expiring',
        to: { email: person.email, name: person.displayName },
        letter: letters.authorisationExpiring(this.context, person.displayName, a.procedureTitle, a.expiresOn),
      },
    ];
  }

  /** The invitation, queued in the caller's transaction so the e-mail exists exactly when the invitation does. */
  async invitation(
    to: { email: string; displayName: string; roles: Role[] },
    invitedBy: string,
    token: string,
    expiresAt: Date,
    transaction: Transaction,
  ): Promise<string[]> {
    const link = `${this.context.publicUrl}/set-password?token=${encodeURIComponent(token)}`;
    const message: OutgoingMessage = {
      kind: 'invitation',
      to: { email: to.email, name: to.displayName },
      letter: letters.invitation(this.context, to.displayName, invitedBy, to.roles.map((r) => ROLE_LABELS[r]), link, expiresAt),
    };
    return this.outbox.send([message], transaction);
  }

  private async recordFacts(recordId: string): Promise<(RecordFacts & { performerId: string }) | null> {
    const record = await SetupRecord.findByPk(recordId, {
      include: [
        { model: Machine, as: 'machine' },
        { model: ProcedureVersion, as: 'procedureVersion', attributes: { exclude: ['body'] } },
        { model: User, as: 'startedBy' },
      ],
    });
    if (!record) return null;
    return {
      id: record.id,
      procedureTitle: record.procedureVersion!.title,
      procedureVersion: record.procedureVersion!.version,
      machine: { id: record.machine!.id, name: record.machine!.name, assetTag: record.machine!.assetTag },
      performer: record.startedBy!.displayName,
      performerId: record.startedById,
      result: record.result ?? null,
    };
  }

  private async safely(what: string, work: () => Promise<string[]>): Promise<string[]> {
    try {
      return await work();
    } catch (err) {
      this.logger.error({ err }, `could not queue the "${what}" e-mail`);
      return [];
    }
  }
}
