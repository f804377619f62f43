// Per-request cost of the busiest routes (not a test): one connection, serially, against the real API
// process (api/main.ts): the median time, the API process's CPU time per request, and the SQL
// statements each request sends, counted by PostgreSQL itself (log_statement = 'all' while the
// bench runs). A bare Express echo process is the baseline for time and CPU.
// Run: npm run bench:statements (part of npm run bench). Starts and removes its own database.
import { readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import pg from 'pg';
import { demoTrainee, withBenchServers, type ServerProcess } from './support/processes';

const ROUNDS = Number(process.env['BENCH_ROUNDS'] ?? 100);

await withBenchServers({}, async ({ stack, api, echo }) => {

  // PostgreSQL logs every statement it runs from here on; the bench counts them per request.
  const admin = new pg.Client({ connectionString: stack.env['DATABASE_ADMIN_URL'] });
  await admin.connect();
  await admin.query("ALTER SYSTEM SET log_statement = 'all'");
  await admin.query('SELECT pg_reload_conf()');
  await admin.end();
  const serverLog = join(stack.env['SETWRIGHT_PG_DIR']!, 'server.log');
  const logSize = () => statSync(serverLog).size;
  const statementsSince = (offset: number) => {
    const text = readFileSync(serverLog).subarray(offset).toString('utf8');
    // Simple-protocol statements log "statement: …"; extended-protocol ones "execute <name>: …".
    return (text.match(/LOG: {2}(?:statement|execute [^:]*):/g) ?? []).length;
  };

  const { headers, machineId } = await demoTrainee(api);
  const started = await fetch(`${api.url}/api/records`, { method: 'POST', headers, body: JSON.stringify({ machineId, procedureKey: 'blade-tension' }) });
  const record = (await started.json()) as { id: string };

  interface Probe {
    name: string;
    server: ServerProcess;
    call: () => Promise<Response>;
  }
  const probes: Probe[] = [
    { name: 'bare Express echo (baseline)', server: echo, call: () => fetch(`${echo.url}/echo`, { method: 'POST', headers, body: JSON.stringify({ idempotencyKey: crypto.randomUUID(), stepId: 'prepare', values: {} }) }) },
    { name: 'POST a step entry', server: api, call: () => fetch(`${api.url}/api/records/${record.id}/entries`, { method: 'POST', headers, body: JSON.stringify({ idempotencyKey: crypto.randomUUID(), stepId: 'prepare', values: {} }) }) },
    { name: 'GET a record', server: api, call: () => fetch(`${api.url}/api/records/${record.id}`, { headers }) },
    { name: 'GET /api/machines', server: api, call: () => fetch(`${api.url}/api/machines`, { headers }) },
    { name: 'GET /api/people/me', server: api, call: () => fetch(`${api.url}/api/people/me`, { headers }) },
    { name: 'GET /api/health', server: api, call: () => fetch(`${api.url}/api/health`) },
  ];
  const rows: string[] = [];
  for (const probe of probes) {
    for (let i = 0; i < 10; i++) await (await probe.call()).arrayBuffer(); // warm up
    const times: number[] = [];
    let bytes = 0;
    const offset = logSize();
    const cpuBefore = probe.server.cpuMs();
    for (let i = 0; i < ROUNDS; i++) {
      const t0 = performance.now();
      const res = await probe.call();
      const body = await res.arrayBuffer();
      times.push(performance.now() - t0);
      if (!res.ok) throw new Error(`${probe.name}: HTTP ${res.status} ${Buffer.from(body).toString()}`);
      bytes = body.byteLength;
    }
    const cpu = (probe.server.cpuMs() - cpuBefore) / ROUNDS;
    await new Promise((r) => setTimeout(r, 300)); // the log is written asynchronously
    const sql = probe.server === echo ? '–' : (statementsSince(offset) / ROUNDS).toFixed(1);
    times.sort((a, b) => a - b);
    rows.push(`| ${probe.name} | ${times[Math.floor(times.length / 2)]!.toFixed(1)} ms | ${cpu.toFixed(2)} ms | ${sql} | ${(bytes / 1024).toFixed(1)} kB |`);
  }
  console.log('');
  console.log(`| request (one connection, ${ROUNDS} each) | median time | server CPU per request | SQL statements per request | response |`);
  console.log('| --- | --- | --- | --- | --- |');
  for (const r of rows) console.log(r);
});
process.exit(0);
