import { createHash, randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { freePort } from './ports';
import { postgresCanReach, startCluster, type Cluster } from './postgres';
import { startObjectStoreFake } from './s3';
import { startSmtpStandIn } from './smtp';

export const ROOT = resolve(import.meta.dirname, '..', '..');

export function say(message: string) {
  console.log(`[setwright] ${message}`);
}

interface Secrets {
  pgAdminPassword: string;
  pgAppPassword: string;
  jwtSecret: string;
}

function randomSecret() {
  return randomBytes(24).toString('base64url');
}

/** Secrets for the local data folder, made once and kept beside the data (git-ignored). */
export function localSecrets(dataRoot: string): Secrets {
  const file = join(dataRoot, 'secrets.json');
  if (existsSync(file)) return JSON.parse(readFileSync(file, 'utf8')) as Secrets;
  const secrets: Secrets = { pgAdminPassword: randomSecret(), pgAppPassword: randomSecret(), jwtSecret: randomBytes(48).toString('base64url') };
  mkdirSync(dataRoot, { recursive: true });
  writeFileSync(file, JSON.stringify(secrets, null, 2), { mode: 0o600 });
  return secrets;
}

/** Fresh random secrets for a throwaway run. */
export function throwawaySecrets(): Secrets {
  return { pgAdminPassword: randomSecret(), pgAppPassword: randomSecret(), jwtSecret: randomBytes(48).toString('base64url') };
}

/**
 * Where the local cluster keeps its files: `.data/pg` in the project, unless the postgres
 * user cannot reach the project folder (a clone under /root, say); then a folder under
 * /var/lib/setwright named after the project's path.
 */
export function localPgDir(): string {
  const dataRoot = join(ROOT, '.data');
  mkdirSync(dataRoot, { recursive: true });
  if (postgresCanReach(dataRoot)) return join(dataRoot, 'pg');
  const elsewhere = join('/var/lib/setwright', createHash('sha256').update(ROOT).digest('hex').slice(0, 12), 'pg');
  say(`the postgres user cannot reach ${dataRoot}; keeping the database in ${elsewhere}`);
  return elsewhere;
}

export interface Stack {
  cluster: Cluster;
  env: Record<string, string>;
  stop(): void;
}

/** Where `npm start` keeps the object-store stand-in's files. */
export const LOCAL_S3_DIR = join(ROOT, 'uploads-fake');
/** Where `npm start` and `npm run dev` keep the messages the SMTP stand-in receives (git-ignored with .data/). */
export const LOCAL_MAIL_DIR = join(ROOT, '.data', 'mail');

/** Start the services Setwright needs and return the environment the API reads. */
export async function startStack(o: {
  pgDir: string;
  pgPort: number;
  secrets: Secrets;
  apiPort: number;
  nodeEnv: string;
  /** Folder of the object-store stand-in (default: the project's uploads-fake/). */
  s3Dir?: string;
  /** Its port on 127.0.0.1 (default: SETWRIGHT_S3_PORT or 54380). */
  s3Port?: number;
  /** Folder of the SMTP stand-in (default: .data/mail; for tests, `mail` beside the throwaway cluster). */
  mailDir?: string;
  /** Its port on 127.0.0.1 (default: SETWRIGHT_SMTP_PORT or 54325; for tests, a free one). */
  smtpPort?: number;
}): Promise<Stack> {
  const cluster = await startCluster({
    dataDir: o.pgDir,
    port: o.pgPort,
    appPassword: o.secrets.pgAppPassword,
    adminPassword: o.secrets.pgAdminPassword,
    log: say,
  });
  let s3;
  try {
    s3 = await startObjectStoreFake({
      directory: o.s3Dir ?? LOCAL_S3_DIR,
      port: o.s3Port ?? Number(process.env['SETWRIGHT_S3_PORT'] ?? 54380),
      log: say,
    });
  } catch (err) {
    cluster.stop();
    throw err;
  }
  const forTests = o.nodeEnv === 'test';
  let smtp;
  try {
    smtp = await startSmtpStandIn({
      directory: o.mailDir ?? (forTests ? join(dirname(o.pgDir), 'mail') : LOCAL_MAIL_DIR),
      port: o.smtpPort ?? (forTests ? await freePort() : Number(process.env['SETWRIGHT_SMTP_PORT'] ?? 54325)),
      log: say,
    });
  } catch (err) {
    void s3.stop();
    cluster.stop();
    throw err;
  }
  const env: Record<string, string> = {
    ...s3.env,
    ...smtp.env,
    NODE_ENV: o.nodeEnv,
    DATABASE_URL: cluster.appUrl,
    DATABASE_ADMIN_URL: cluster.adminUrl,
    SETWRIGHT_PG_DIR: cluster.dataDir,
    JWT_SECRET: o.secrets.jwtSecret,
    PORT: String(o.apiPort),
    HOST: '127.0.0.1',
    STATIC_DIR: join(ROOT, 'dist', 'setwright', 'browser'),
  };
  return {
    cluster,
    env,
    stop() {
      void smtp.stop();
      void s3.stop();
      cluster.stop();
    },
  };
}

/** Apply migrations and the demo data, with the API's own code, then disconnect. */
export async function prepareDatabase(env: Record<string, string>): Promise<void> {
  Object.assign(process.env, env);
  const { loadConfig } = await import('../../api/config');
  const { createDatabase } = await import('../../api/db/database');
  const { migrate } = await import('../../api/db/migrate');
  const { seedDemo } = await import('../../api/db/seed');
  const config = loadConfig(process.env);
  const sequelize = createDatabase(config.DATABASE_URL, 2);
  try {
    const applied = await migrate(sequelize);
    say(applied.length ? `applied migrations: ${applied.join(', ')}` : 'database schema is up to date');
    await seedDemo(config.BCRYPT_COST);
    say('demo workshop data is in place');
    const { loadProcedurePacks } = await import('../../api/modules/procedures/loader');
    const loaded = await loadProcedurePacks(sequelize);
    if (loaded.length) say(`loaded procedures: ${loaded.join(', ')}`);
    // The demo's history needs the approved procedures, so it comes after them.
    const { seedDemoHistory } = await import('../../api/db/seed-history');
    const { createLogger } = await import('../../api/lib/logger');
    const started = Date.now();
    const { written } = await seedDemoHistory(sequelize, config, createLogger(config.LOG_LEVEL));
    if (written) say(`wrote the demo workshop's history: ${written} records in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  } finally {
    await sequelize.close();
  }
}
