import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { createApp } from './app';
import { loadConfig, type Config } from './config';
import { createDatabase } from './db/database';
import { migrate } from './db/migrate';
import { withStartupLock } from './db/startup-lock';
import { loadProcedurePacks } from './modules/procedures/loader';
import { createLogger } from './lib/logger';
import { Outbox } from './modules/mail/outbox';

export interface RunningApi {
  url: string;
  stop(): Promise<void>;
}

/**
 * Connect, migrate, listen. Used by `npm start` and `npm run dev`; tests use createApp() directly.
 * Any number of instances may run on one database (see README, "Running more than one API process").
 */
export async function startApi(config: Config = loadConfig()): Promise<RunningApi> {
  const logger = createLogger(config.LOG_LEVEL);
  const sequelize = createDatabase(config.DATABASE_URL, config.DATABASE_POOL_MAX);
  // Instances starting together on one database take turns here (an advisory lock): one migrates and loads the packs.
  const prepared = await withStartupLock(config.DATABASE_URL, async () => ({
    migrations: await migrate(sequelize),
    procedures: await loadProcedurePacks(sequelize),
  }));
  logger.info(prepared, 'database ready');
  // This instance delivers e-mail from the outbox too (any number of instances may: each message goes once).
  const outbox = new Outbox(sequelize, config, logger);
  const app = createApp({ config, sequelize, logger, outbox });
  await outbox.start();
  const server: Server = await new Promise((resolve) => {
    const s = app.listen(config.PORT, config.HOST, () => resolve(s));
  });
  const { port } = server.address() as AddressInfo;
  const url = `http://${config.HOST}:${port}`;
  logger.info({ url }, 'Setwright is listening');
  return {
    url,
    async stop() {
      const closed = new Promise<void>((resolve) => server.close(() => resolve()));
      server.closeIdleConnections();
      setTimeout(() => server.closeAllConnections(), 3000).unref();
      await closed;
      await outbox.stop();
      await sequelize.close();
    },
  };
}

// Run directly (npm run dev): start, and stop cleanly on Ctrl-C.
if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const api = await startApi();
  const stop = async () => {
    await api.stop();
    process.exit(0);
  };
  process.once('SIGINT', stop);
  process.once('SIGTERM', stop);
}
