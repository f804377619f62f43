import pg from 'pg';

/** The advisory-lock key that every Setwright instance takes around its start-up work ("setwright" in ASCII, as a number). */
export const STARTUP_LOCK_KEY = 0x73_65_74_77_72_69_67n;

/**
 * Run `work` (migrations, loading the procedure packs) while holding a PostgreSQL advisory lock,
 * so API instances starting at the same moment on one database take turns: the first migrates and
 * loads, the next finds nothing left to do. The lock lives on a connection of its own (outside the
 * Sequelize pool, which `work` uses freely) and goes when that connection closes, even if the
 * process dies half-way.
 */
export async function withStartupLock<T>(databaseUrl: string, work: () => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: databaseUrl, application_name: 'setwright start-up lock' });
  await client.connect();
  try {
    await client.query('SELECT pg_advisory_lock($1)', [STARTUP_LOCK_KEY.toString()]);
    try {
      return await work();
    } finally {
      await client.query('SELECT pg_advisory_unlock($1)', [STARTUP_LOCK_KEY.toString()]);
    }
  } finally {
    await client.end();
  }
}
