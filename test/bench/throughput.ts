// Step-entry write throughput (not a test): autocannon with 50 connections and a signed-in user
// against POST /api/records/:id/entries, next to a bare Express JSON echo in the same run.
// Run: npx tsx test/bench/throughput.ts   (part of npm run bench). Starts and removes its own database.
import { chmodSync, mkdtempSync, rmSync } from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import autocannon from 'autocannon';
import express from 'express';
import { freePort } from '../../scripts/lib/ports';
import { prepareDatabase, startStack, throwawaySecrets, type Stack } from '../../scripts/lib/stack';

const DURATION = Number(process.env['BENCH_SECONDS'] ?? 10);
const CONNECTIONS = 50;

function listen(app: express.Express): Promise<Server> {
  return new Promise((ok) => {
    const s = app.listen(0, '127.0.0.1', () => ok(s));
  });
}
const url = (s: Server) => `http://127.0.0.1:${(s.address() as AddressInfo).port}`;

async function cannon(target: string, opts: Partial<autocannon.Options>) {
  const result = await autocannon({ url: target, connections: CONNECTIONS, duration: DURATION, ...opts });
  return { rps: result.requests.average, p99: result.latency.p99, non2xx: result.non2xx, errors: result.errors };
}

const tmp = mkdtempSync(join(tmpdir(), 'setwright-bench-'));
chmodSync(tmp, 0o755);
let stack: Stack | undefined;
try {
  stack = await startStack({ pgDir: join(tmp, 'pg'), pgPort: await freePort(), apiPort: 0, secrets: throwawaySecrets(), nodeEnv: 'test', s3Dir: join(tmp, 's3'), s3Port: await freePort() });
  await prepareDatabase(stack.env);
  Object.assign(process.env, stack.env, { LOG_LEVEL: 'silent', DATABASE_POOL_MAX: '20' });
  const { loadConfig } = await import('../../api/config');
  const { createDatabase } = await import('../../api/db/database');
  const { createApp } = await import('../../api/app');
  const { createLogger } = await import('../../api/lib/logger');
  const { DEMO_PEOPLE, DEMO_PASSWORD, DEMO_MACHINES } = await import('../../api/db/seed');
  const { Machine } = await import('../../api/modules/machines/model');
  const config = loadConfig(process.env);
  const sequelize = createDatabase(config.DATABASE_URL, config.DATABASE_POOL_MAX);
  const api = await listen(createApp({ config, sequelize, logger: createLogger('silent') }));

  const bare = express();
  bare.use(express.json());
  bare.post('/echo', (req, res) => void res.status(201).json({ received: req.body }));
  const echo = await listen(bare);

  const trainee = DEMO_PEOPLE.find((p) => p.roles.includes('trainee'))!;
  const login = await fetch(`${url(api)}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: trainee.email, password: DEMO_PASSWORD }) });
  const { accessToken } = (await login.json()) as { accessToken: string };
  const machine = await Machine.findOne({ where: { assetTag: DEMO_MACHINES[0]!.assetTag } });
  // Fifty tablets, each with a record of its own underway.
  const records: string[] = [];
  for (let i = 0; i < CONNECTIONS; i++) {
    const started = await fetch(`${url(api)}/api/records`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', authorization: `Bearer ${accessToken}` },
      body: JSON.stringify({ machineId: machine!.id, procedureKey: 'blade-tension' }),
    });
    records.push(((await started.json()) as { id: string }).id);
  }
  let next = 0;
  const body = (key: string) => JSON.stringify({ idempotencyKey: key, stepId: 'prepare', values: {} });

  const base = await cannon(`${url(echo)}/echo`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: body('00000000-0000-4000-8000-000000000000') });
  const entries = await cannon(`${url(api)}/api/records/${records[0]}/entries`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', authorization: `Bearer ${accessToken}` },
    // A fresh idempotency key for every request, so each one is a real new entry, spread over the records.
    requests: [{ setupRequest: (req) => ({ ...req, path: `/api/records/${records[next++ % records.length]}/entries`, body: body(crypto.randomUUID()) }) }],
  });
  const ratio = entries.rps / base.rps;
  console.log('');
  console.log('| measure | step entries (API + PostgreSQL) | bare Express echo | ratio (goal ≥ 0.35) |');
  console.log('| --- | --- | --- | --- |');
  console.log(`| requests/s (50 connections, ${DURATION} s) | ${entries.rps.toFixed(0)} | ${base.rps.toFixed(0)} | ${ratio.toFixed(2)} |`);
  console.log(`| p99 latency (goal ≤ 25 ms) | ${entries.p99} ms | ${base.p99} ms | |`);
  console.log(`| non-2xx / errors | ${entries.non2xx} / ${entries.errors} | ${base.non2xx} / ${base.errors} | |`);
  api.closeAllConnections();
  echo.closeAllConnections();
  api.close();
  echo.close();
  await sequelize.close();
} finally {
  stack?.stop();
  rmSync(tmp, { recursive: true, force: true });
}
process.exit(0);
