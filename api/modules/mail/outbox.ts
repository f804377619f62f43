import nodemailer, { type Transporter } from 'nodemailer';
import PgBoss from 'pg-boss';
import type { ClientBase, QueryResult } from 'pg';
import type { Logger } from 'pino';
import type { Sequelize, Transaction } from 'sequelize';
import type { Config } from '../../config';
import { JOB_SCHEMA } from '../../db/migrations/0007-outbox-and-invitations';
import type { Letter } from './messages';
import { OutboxMessage, type MessageKind } from './model';

/** One e-mail to queue. */
export interface OutgoingMessage {
  kind: MessageKind;
  to: { email: string; name: string };
  letter: Letter;
  recordId?: string | null;
}

interface MailJob {
  outboxId: string;
}

/** The address part of "Name <address>" (or the whole thing when it is a bare address). */
export function addressOf(from: string): string {
  return (/<([^>]+)>/.exec(from)?.[1] ?? from).trim();
}

/**
 * E-mail through an outbox in PostgreSQL. Queuing writes the message and its delivery job (pg-boss)
 * in one transaction, the caller's when given, so an e-mail exists exactly when what it tells of
 * does. The worker (start()) sends each job to the SMTP relay; when the relay is down the job
 * fails and pg-boss retries it with doubling waits, so nothing is lost. Before sending, the worker
 * locks the message row and skips it if it is already marked sent, so a retried or expired job
 * never sends it twice. (If the relay took a message and the database failed before the row was
 * marked, it would go again; its Message-ID is the same both times, so mail clients can tell.)
 *
 * Queuing needs no start(): any API instance can queue; the instances that run start() deliver.
 */
export class Outbox {
  private readonly boss: PgBoss;
  private readonly queue: string;
  private ready?: Promise<void>;
  private transport?: Transporter;
  private workerId?: string;
  private started = false;
  /** Scheduled work by name: the cron and what to run. */
  private readonly schedules = new Map<string, { cron: string; run: () => Promise<void> }>();

  constructor(
    private readonly sequelize: Sequelize,
    private readonly config: Config,
    private readonly logger: Logger,
  ) {
    this.queue = config.MAIL_QUEUE;
    this.boss = new PgBoss({
      db: this.connection(),
      schema: JOB_SCHEMA,
      // The schema is ours to change, through the migrations; start() only checks its version.
      migrate: false,
      pollingIntervalSeconds: config.MAIL_POLL_SECONDS,
    });
    this.boss.on('error', (err) => this.logger.error({ err }, 'mail queue error'));
  }

  /** Queue e-mails, in the caller's transaction when given (then they exist only if it commits). Returns their ids. */
  async send(messages: OutgoingMessage[], transaction?: Transaction): Promise<string[]> {
    if (!messages.length) return [];
    await this.ensureQueue();
    const write = async (t: Transaction) => {
      const ids: string[] = [];
      for (const m of messages) {
        const row = await OutboxMessage.create(
          {
            kind: m.kind,
            toAddress: m.to.email,
            toName: m.to.name,
            subject: m.letter.subject,
            textBody: m.letter.text,
            htmlBody: m.letter.html,
            recordId: m.recordId ?? null,
          },
          { transaction: t },
        );
        await this.boss.send(this.queue, { outboxId: row.id } satisfies MailJob, {
          id: row.id,
          db: this.connection(t),
          retryLimit: this.config.MAIL_RETRY_LIMIT,
          retryDelay: this.config.MAIL_RETRY_DELAY_SECONDS,
          retryBackoff: true,
        });
        ids.push(row.id);
      }
      t.afterCommit(() => this.wake());
      return ids;
    };
    return transaction ? write(transaction) : this.sequelize.transaction(write);
  }

  /**
   * Queue these e-mails unless a batch with the same key went into this queue before. The key and
   * the messages are written in one transaction: of two instances running the same batch at once,
   * the second waits for the first and then queues nothing; a batch whose queuing failed can run
   * again. Returns the ids ([] when the batch had gone already, or was empty).
   */
  async sendOnce(key: string, messages: OutgoingMessage[]): Promise<string[]> {
    if (!messages.length) return [];
    return this.sequelize.transaction(async (transaction) => {
      const [claimed] = await this.sequelize.query('INSERT INTO mail_batches (key) VALUES ($1) ON CONFLICT (key) DO NOTHING RETURNING key', {
        bind: [`${this.queue}:${key}`],
        transaction,
      });
      return (claimed as unknown[]).length ? this.send(messages, transaction) : [];
    });
  }

  /**
   * Run `run` on a cron schedule (in the workshop's time zone) wherever the outbox is started; pg-boss
   * makes sure one instance runs it each time (its clock runs on one instance per tick, and each
   * firing is one job that one worker takes). For work that must never repeat, use sendOnce() in `run`. Register before or after start(); the same name again
   * replaces what runs.
   */
  async schedule(name: string, cron: string, run: () => Promise<void>): Promise<void> {
    const known = this.schedules.has(name);
    this.schedules.set(name, { cron, run });
    if (this.started && !known) await this.startSchedule(name);
  }

  /** Start delivering (and running schedules) in this process. */
  async start(): Promise<void> {
    if (this.started) return;
    await this.boss.start();
    await this.ensureQueue();
    this.transport = nodemailer.createTransport({
      host: this.config.SMTP_HOST,
      port: this.config.SMTP_PORT,
      secure: this.config.SMTP_SECURE === 'true',
      ignoreTLS: this.config.SMTP_IGNORE_TLS === 'true',
      auth: this.config.SMTP_USER ? { user: this.config.SMTP_USER, pass: this.config.SMTP_PASSWORD! } : undefined,
      connectionTimeout: 10_000,
      greetingTimeout: 10_000,
      socketTimeout: 30_000,
    });
    this.workerId = await this.boss.work<MailJob>(
      this.queue,
      { includeMetadata: true, batchSize: 10, pollingIntervalSeconds: this.config.MAIL_POLL_SECONDS },
      (jobs) => this.deliverAll(jobs),
    );
    this.started = true;
    for (const name of this.schedules.keys()) await this.startSchedule(name);
    this.logger.info({ relay: `${this.config.SMTP_HOST}:${this.config.SMTP_PORT}`, queue: this.queue }, 'mail worker started');
  }

  async stop(): Promise<void> {
    if (!this.started) return;
    this.started = false;
    await this.boss.stop({ graceful: true, close: false, timeout: 10_000 });
    this.transport?.close();
  }

  /** Look for work now rather than at the next poll (only the worker in this process hears it). */
  private wake() {
    if (this.workerId) this.boss.notifyWorker(this.workerId);
  }

  private ensureQueue(): Promise<void> {
    this.ready ??= this.boss
      .createQueue(this.queue, {
        name: this.queue,
        retryLimit: this.config.MAIL_RETRY_LIMIT,
        retryDelay: this.config.MAIL_RETRY_DELAY_SECONDS,
        retryBackoff: true,
      })
      .catch((err: unknown) => {
        this.ready = undefined;
        throw err;
      });
    return this.ready;
  }

  private async startSchedule(name: string) {
    const queue = `${this.queue}.${name}`;
    await this.boss.createQueue(queue, { name: queue, retryLimit: 2, retryDelay: 60 });
    await this.boss.schedule(queue, this.schedules.get(name)!.cron, {}, { tz: this.config.WORKSHOP_TIME_ZONE });
    await this.boss.work(queue, async () => {
      try {
        await this.schedules.get(name)?.run();
      } catch (err) {
        // pg-boss retries the job; say why it failed.
        this.logger.error({ err, job: name }, 'a scheduled job failed');
        throw err;
      }
    });
  }

  /** Each job on its own: a failed one is failed (and retried later) without failing the others. */
  private async deliverAll(jobs: PgBoss.JobWithMetadata<MailJob>[]): Promise<void> {
    for (const job of jobs) {
      try {
        await this.deliver(job.data.outboxId, job.retryCount >= job.retryLimit);
      } catch (err) {
        const message = (err as Error).message;
        this.logger.warn({ outboxId: job.data.outboxId, attempt: job.retryCount + 1, err: message }, 'e-mail not delivered yet');
        await this.boss.fail(this.queue, job.id, { message });
      }
    }
  }

  private async deliver(id: string, lastTry: boolean): Promise<void> {
    const failure = await this.sequelize.transaction(async (transaction) => {
      const row = await OutboxMessage.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE, skipLocked: true });
      if (!row) {
        const exists = await OutboxMessage.count({ where: { id }, transaction });
        return exists ? new Error('another worker is sending this e-mail right now') : null;
      }
      if (row.status === 'sent') return null;
      try {
        const info = await this.transport!.sendMail({
          from: this.config.MAIL_FROM,
          to: { name: row.toName, address: row.toAddress },
          subject: row.subject,
          text: row.textBody,
          html: row.htmlBody,
          messageId: `<${row.id}@${addressOf(this.config.MAIL_FROM).split('@')[1] ?? 'setwright.invalid'}>`,
        });
        await row.update({ status: 'sent', sentAt: new Date(), attempts: row.attempts + 1, lastError: null, messageId: String(info.messageId) }, { transaction });
        return null;
      } catch (err) {
        const message = String((err as Error).message ?? err).slice(0, 1000);
        await row.update({ attempts: row.attempts + 1, lastError: message, status: lastTry ? 'failed' : 'queued' }, { transaction });
        return err as Error;
      }
    });
    if (failure) throw failure;
  }

  /** pg-boss runs its SQL on our Sequelize pool (or inside a Sequelize transaction), so there is one pool to close. */
  private connection(transaction?: Transaction): PgBoss.Db {
    return {
      executeSql: async (text: string, values: unknown[]): Promise<QueryResult> => {
        if (transaction) return (transaction as unknown as { connection: ClientBase }).connection.query(text, values);
        const manager = this.sequelize.connectionManager;
        const client = (await manager.getConnection({ type: 'write' })) as unknown as ClientBase;
        try {
          return await client.query(text, values);
        } finally {
          manager.releaseConnection(client as never);
        }
      },
    };
  }
}
