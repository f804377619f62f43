// Step-entry write throughput (not a test): autocannon with 50 connections and a signed-in user
// against POST /api/records/:id/entries on the real API process, next to a bare Express JSON echo
// process in the same run.
// Run: npm run bench:throughput (part of npm run bench). Starts and removes its own database.
import autocannon from 'autocannon';
import { demoTrainee, withBenchServers, type ServerProcess } from './support/processes';

const DURATION = Number(process.env['BENCH_SECONDS'] ?? 10);
const CONNECTIONS = 50;
const GOAL_RATIO = 0.35;
const GOAL_P99_MS = 25;

interface Load {
  rps: number;
  p99: number;
  non2xx: number;
  errors: number;
  /** CPU milliseconds the server process spent per request answered. */
  cpuPerRequest: number;
}

async function cannon(server: ServerProcess, opts: Partial<autocannon.Options> & { url: string }): Promise<Load> {
  const cpuBefore = server.cpuMs();
  const result = await autocannon({ connections: CONNECTIONS, duration: DURATION, ...opts });
  const cpu = server.cpuMs() - cpuBefore;
  return { rps: result.requests.average, p99: result.latency.p99, non2xx: result.non2xx, errors: result.errors, cpuPerRequest: cpu / Math.max(1, result.requests.total) };
}

await withBenchServers({ DATABASE_POOL_MAX: '20' }, async ({ api, echo }) => {

  const { headers, machineId } = await demoTrainee(api);
  // Fifty tablets, each with a record of its own underway.
  const records: string[] = [];
  for (let i = 0; i < CONNECTIONS; i++) {
    const started = await fetch(`${api.url}/api/records`, { method: 'POST', headers, body: JSON.stringify({ machineId, procedureKey: 'blade-tension' }) });
    records.push(((await started.json()) as { id: string }).id);
  }
  let next = 0;
  const entry = (key: string) => ({ idempotencyKey: key, stepId: 'prepare', values: {} });

  const base = await cannon(echo, { url: `${echo.url}/echo`, method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(entry('00000000-0000-4000-8000-000000000000')) });
  const entries = await cannon(api, {
    url: `${api.url}/api/records/${records[0]}/entries`,
    method: 'POST',
    headers,
    // A fresh idempotency key for every request, so each one is a real new entry, spread over the records.
    requests: [{ setupRequest: (req) => ({ ...req, path: `/api/records/${records[next++ % records.length]}/entries`, body: JSON.stringify(entry(crypto.randomUUID())) }) }],
  });
  const ratio = entries.rps / base.rps;
  const mem = api.memoryMb();
  const ok = (pass: boolean) => (pass ? 'met' : 'missed');
  console.log('');
  console.log(`| measure (${CONNECTIONS} connections, ${DURATION} s each) | step entries (API process + PostgreSQL) | bare Express echo process | goal |`);
  console.log('| --- | --- | --- | --- |');
  console.log(`| requests/s | ${entries.rps.toFixed(0)} | ${base.rps.toFixed(0)} | ratio ${ratio.toFixed(2)} (goal ≥ ${GOAL_RATIO}: ${ok(ratio >= GOAL_RATIO)}) |`);
  console.log(`| p99 latency | ${entries.p99} ms | ${base.p99} ms | ≤ ${GOAL_P99_MS} ms: ${ok(entries.p99 <= GOAL_P99_MS)} |`);
  console.log(`| server CPU per request | ${entries.cpuPerRequest.toFixed(2)} ms | ${base.cpuPerRequest.toFixed(2)} ms | |`);
  console.log(`| non-2xx / errors | ${entries.non2xx} / ${entries.errors} | ${base.non2xx} / ${base.errors} | 0 / 0 |`);
  console.log(`| API process memory | RSS ${mem.rss.toFixed(0)} MB, peak ${mem.peak.toFixed(0)} MB | | |`);
});
process.exit(0);
