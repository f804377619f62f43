import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit';
import type { Sequelize } from 'sequelize';

/** Makes the store for one throttle, by its name (each throttle needs a store of its own). */
export type ThrottleStores = (name: string) => Store;

/** How many expired counters one increment clears away at most (so no sweep ever holds up a sign-in). */
const SWEEP_BATCH = 100;

interface CounterRow {
  hits: number;
  reset_at: Date;
}

/**
 * express-rate-limit's Store on a PostgreSQL table, so every API instance on the database counts
 * the same tries. One row per key (`<namespace><throttle>:<key>`): `hits` in the window that ends
 * at `reset_at`. Counting up is one `INSERT … ON CONFLICT … DO UPDATE … RETURNING` that starts a
 * new window when the old one has ended, so two instances counting the same key at the same
 * moment both land (row lock) and see distinct totals. Times are the database's clock, one for
 * every instance. Each increment also deletes a batch of expired rows, so the table stays small.
 */
export class PostgresThrottleStore implements Store {
  /** Counted in the database, so one key's hits are shared by every instance (express-rate-limit's double-count check reads this). */
  readonly localKeys = false;
  readonly prefix: string;
  private windowMs = 60_000;

  constructor(
    private readonly sequelize: Sequelize,
    prefix: string,
  ) {
    this.prefix = prefix;
  }

  /** express-rate-limit calls this once with the throttle's options. */
  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const rows = await this.rows('SELECT hits, reset_at FROM throttle_counters WHERE key = $1 AND reset_at > now()', [this.prefix + key]);
    return rows[0] ? info(rows[0]) : undefined;
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const rows = await this.rows(
      `WITH swept AS (
         DELETE FROM throttle_counters
          WHERE key IN (SELECT key FROM throttle_counters WHERE reset_at <= now() AND key <> $1 LIMIT ${SWEEP_BATCH} FOR UPDATE SKIP LOCKED)
       )
       INSERT INTO throttle_counters AS c (key, hits, reset_at)
       VALUES ($1, 1, now() + $2 * interval '1 millisecond')
       ON CONFLICT (key) DO UPDATE SET
         hits = CASE WHEN c.reset_at <= now() THEN 1 ELSE c.hits + 1 END,
         reset_at = CASE WHEN c.reset_at <= now() THEN EXCLUDED.reset_at ELSE c.reset_at END
       RETURNING hits, reset_at`,
      [this.prefix + key, this.windowMs],
    );
    return info(rows[0]!);
  }

  /** Takes back one hit (skipSuccessfulRequests: a sign-in that worked does not count); never below zero. */
  async decrement(key: string): Promise<void> {
    await this.rows('UPDATE throttle_counters SET hits = GREATEST(hits - 1, 0) WHERE key = $1 AND reset_at > now()', [this.prefix + key]);
  }

  async resetKey(key: string): Promise<void> {
    await this.rows('DELETE FROM throttle_counters WHERE key = $1', [this.prefix + key]);
  }

  /** Every key of this throttle (and only this one). */
  async resetAll(): Promise<void> {
    await this.rows('DELETE FROM throttle_counters WHERE left(key, length($1)) = $1', [this.prefix]);
  }

  private async rows(sql: string, bind: unknown[]): Promise<CounterRow[]> {
    const [rows] = await this.sequelize.query(sql, { bind });
    return rows as CounterRow[];
  }
}

function info(row: CounterRow): ClientRateLimitInfo {
  return { totalHits: Number(row.hits), resetTime: new Date(row.reset_at) };
}

/**
 * The stores for an app's throttles, all in the one table. `namespace` goes before every key: ''
 * in production, so every instance shares the counts; tests give each app a namespace of its own
 * so one test's tries never count against another's.
 */
export function postgresThrottleStores(sequelize: Sequelize, namespace = ''): ThrottleStores {
  return (name) => new PostgresThrottleStore(sequelize, `${namespace}${name}:`);
}
