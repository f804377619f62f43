// Benchmarks measure the API as it runs in production: its own process (the bundle of api/main.ts), apart from
// the harness that sends the load, so the harness's CPU and memory never count as the API's.
import { spawn, type ChildProcess } from 'node:child_process';
import { chmodSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { apiProcessEnv, buildApiBundle } from '../../../scripts/lib/api-bundle';
import { freePort } from '../../../scripts/lib/ports';
import { prepareDatabase, ROOT, startStack, throwawaySecrets, type Stack } from '../../../scripts/lib/stack';

export interface ServerProcess {
  url: string;
  pid: number;
  /** CPU time (user + system) the process has used so far, in milliseconds. */
  cpuMs(): number;
  /** The process's resident memory now and its peak so far (VmRSS, VmHWM), in MB. */
  memoryMb(): { rss: number; peak: number };
  stop(): Promise<void>;
}

const TICKS_PER_SECOND = 100; // Linux's USER_HZ

function cpuMsOf(pid: number): number {
  // /proc/<pid>/stat: the command may hold spaces, so count the fields after its closing bracket.
  const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
  const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  return ((Number(fields[11]) + Number(fields[12])) * 1000) / TICKS_PER_SECOND;
}

function memoryOf(pid: number): { rss: number; peak: number } {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8');
  const kb = (name: string) => Number(new RegExp(`^${name}:\\s+(\\d+)`, 'm').exec(status)?.[1] ?? 0);
  return { rss: kb('VmRSS') / 1024, peak: kb('VmHWM') / 1024 };
}

async function waitUntilUp(url: string, child: ChildProcess, log: () => string): Promise<void> {
  const until = Date.now() + 60_000;
  while (Date.now() < until) {
    if (child.exitCode !== null) throw new Error(`the server process ended (exit ${child.exitCode}):\n${log()}`);
    try {
      const res = await fetch(url);
      if (res.status < 500) return;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`the server process did not answer within 60 s:\n${log()}`);
}

async function startProcess(args: string[], env: NodeJS.ProcessEnv, probePath: string): Promise<ServerProcess> {
  const port = await freePort();
  // BENCH_CPU_PROF=<folder> writes a V8 CPU profile of each server process there (node --cpu-prof).
  const profile = process.env['BENCH_CPU_PROF'] ? ['--cpu-prof', `--cpu-prof-dir=${process.env['BENCH_CPU_PROF']}`] : [];
  const child = spawn(process.execPath, [...profile, ...args], {
    cwd: ROOT,
    env: { ...env, PORT: String(port), HOST: '127.0.0.1' },
    stdio: ['ignore', 'ignore', 'pipe'],
  });
  let stderr = '';
  child.stderr!.on('data', (d: Buffer) => void (stderr = (stderr + d.toString()).slice(-4000)));
  const url = `http://127.0.0.1:${port}`;
  const pid = child.pid!;
  try {
    await waitUntilUp(url + probePath, child, () => stderr);
  } catch (err) {
    child.kill('SIGKILL');
    throw err;
  }
  return {
    url,
    pid,
    cpuMs: () => cpuMsOf(pid),
    memoryMb: () => memoryOf(pid),
    stop: () =>
      new Promise<void>((resolve) => {
        if (child.exitCode !== null) return resolve();
        const killer = setTimeout(() => child.kill('SIGKILL'), 5000);
        child.once('exit', () => {
          clearTimeout(killer);
          resolve();
        });
        child.kill('SIGTERM');
      }),
  };
}

/**
 * The real API as `npm start` runs it (its bundle, with the same process environment: migrate,
 * load packs, mail worker, listen) against the bench's stack.
 */
export async function startApiProcess(stackEnv: Record<string, string>, extra: Record<string, string> = {}): Promise<ServerProcess> {
  const bundle = await buildApiBundle();
  return startProcess([bundle], apiProcessEnv({ ...stackEnv, LOG_LEVEL: 'silent', ...extra }), '/api/health');
}

/** A bare Express JSON echo, the baseline every API figure is set against. */
export function startEchoProcess(): Promise<ServerProcess> {
  return startProcess([join(ROOT, 'test/bench/support/echo.mjs')], process.env, '/echo');
}

/**
 * A throwaway stack (PostgreSQL with the demo data, object store, mail), the API process and the
 * echo process for one benchmark; everything is stopped and removed afterwards, even on failure.
 */
export async function withBenchServers(apiEnv: Record<string, string>, run: (s: { stack: Stack; api: ServerProcess; echo: ServerProcess }) => Promise<void>): Promise<void> {
  const tmp = mkdtempSync(join(tmpdir(), 'setwright-bench-'));
  chmodSync(tmp, 0o755); // the postgres user must reach the cluster folder inside it
  let stack: Stack | undefined;
  const servers: ServerProcess[] = [];
  try {
    stack = await startStack({ pgDir: join(tmp, 'pg'), pgPort: await freePort(), apiPort: 0, secrets: throwawaySecrets(), nodeEnv: 'test', s3Dir: join(tmp, 's3'), s3Port: await freePort() });
    await prepareDatabase(stack.env);
    const api = await startApiProcess(stack.env, apiEnv);
    servers.push(api);
    const echo = await startEchoProcess();
    servers.push(echo);
    await run({ stack, api, echo });
  } finally {
    for (const s of servers) await s.stop();
    stack?.stop();
    rmSync(tmp, { recursive: true, force: true });
  }
}

/** Sign a demo trainee in on the API process; the headers to send, and the first demo saw's id. */
export async function demoTrainee(api: ServerProcess): Promise<{ headers: Record<string, string>; machineId: string }> {
  const { DEMO_PEOPLE, DEMO_PASSWORD, DEMO_MACHINES } = await import('../../../api/db/seed');
  const trainee = DEMO_PEOPLE.find((p) => p.roles.includes('trainee'))!;
  const login = await fetch(`${api.url}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: trainee.email, password: DEMO_PASSWORD }) });
  const { accessToken } = (await login.json()) as { accessToken: string };
  const headers = { 'content-type': 'application/json', authorization: `Bearer ${accessToken}` };
  const machines = (await (await fetch(`${api.url}/api/machines`, { headers })).json()) as { id: string; assetTag: string }[];
  return { headers, machineId: machines.find((m) => m.assetTag === DEMO_MACHINES[0]!.assetTag)!.id };
}
