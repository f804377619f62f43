// `npm test`: a throwaway database, then every check; always cleans up; ends with "N passed, N failed".
import { chmodSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { freePort } from './lib/ports';
import { runCommand, type RunResult } from './lib/run';
import { prepareDatabase, ROOT, say, startStack, throwawaySecrets, type Stack } from './lib/stack';

interface Tally {
  stage: string;
  passed: number;
  failed: number;
}

const started = Date.now();
const tallies: Tally[] = [];
const only = process.argv.slice(2); // e.g. `npm test -- api karma`
const wanted = (stage: string) => only.length === 0 || only.includes(stage);

const tmp = mkdtempSync(join(tmpdir(), 'setwright-test-'));
chmodSync(tmp, 0o755); // the postgres user must reach the cluster folder inside it
let stack: Stack | undefined;
let cleaned = false;
function cleanUp() {
  if (cleaned) return;
  cleaned = true;
  try {
    stack?.stop();
  } finally {
    rmSync(tmp, { recursive: true, force: true });
  }
}
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.once(signal, () => {
    cleanUp();
    process.exit(130);
  });
}

/** A stage that is one check: passed when the command exits 0. */
function single(stage: string, r: RunResult): Tally {
  return { stage, passed: r.code === 0 ? 1 : 0, failed: r.code === 0 ? 0 : 1 };
}

/** Karma's progress reporter ends with "TOTAL: 3 FAILED, 40 SUCCESS" (or "TOTAL: 43 SUCCESS"). */
function karmaTally(r: RunResult): Tally {
  const clean = r.output.replace(/\x1b\[[0-9;]*m/g, '');
  const total = [...clean.matchAll(/TOTAL: (?:(\d+) FAILED, )?(\d+) SUCCESS/g)].pop();
  if (!total) return { stage: 'client specs', passed: 0, failed: 1 };
  const failed = Number(total[1] ?? 0);
  return { stage: 'client specs', passed: Number(total[2]), failed: failed || (r.code === 0 ? 0 : 1) };
}

/** node:test's spec reporter ends with "ℹ pass N" and "ℹ fail N". */
function nodeTally(stage: string, r: RunResult): Tally {
  const pass = [...r.output.matchAll(/ℹ pass (\d+)/g)].pop();
  const fail = [...r.output.matchAll(/ℹ fail (\d+)/g)].pop();
  if (!pass || !fail) return { stage, passed: 0, failed: 1 };
  const failed = Number(fail[1]);
  return { stage, passed: Number(pass[1]), failed: failed || (r.code === 0 ? 0 : 1) };
}

/** SETWRIGHT_TEST_MATCH=fuzz runs only the test files whose names contain that text (a quicker loop). */
const fileMatch = process.env['SETWRIGHT_TEST_MATCH'];

function testFiles(folder: string): string[] {
  const dir = join(ROOT, 'test', folder);
  try {
    return readdirSync(dir)
      .filter((f) => f.endsWith('.test.ts') && (!fileMatch || f.includes(fileMatch)))
      .sort()
      .map((f) => join('test', folder, f));
  } catch {
    return [];
  }
}

try {
  stack = await startStack({
    pgDir: join(tmp, 'pg'),
    pgPort: await freePort(),
    s3Dir: join(tmp, 's3'),
    s3Port: await freePort(),
    apiPort: 0,
    secrets: throwawaySecrets(),
    nodeEnv: 'test',
  });
  await prepareDatabase(stack.env);
  const env = { ...stack.env, LOG_LEVEL: 'silent' };

  if (wanted('typecheck')) {
    say('type-checking api/, procedures/, scripts/ and test/…');
    tallies.push(single('type-check', await runCommand('npx', ['tsc', '-p', 'tsconfig.api.json', '--noEmit'])));
  }
  if (wanted('build')) {
    say('building the client app (production)…');
    tallies.push(single('production build', await runCommand('npx', ['ng', 'build', '--progress=false'])));
  }
  if (wanted('karma')) {
    say('client specs in headless Chromium…');
    const chrome = { CHROME_BIN: process.env['CHROME_BIN'] ?? '/usr/bin/chromium' };
    tallies.push(karmaTally(await runCommand('npx', ['ng', 'test', '--watch=false', '--progress=false'], chrome)));
  }
  // e2e drives Debian's Chromium against the production build served by the real API (build it first).
  for (const folder of ['maths', 'procedures', 'api', 'e2e']) {
    const files = testFiles(folder);
    if (!wanted(folder) || files.length === 0) continue;
    say(`${folder} tests…`);
    // API and browser files share one database: run them one file at a time (fingerprint checks rely on it).
    const serial = folder === 'e2e' || folder === 'api' ? ['--test-concurrency=1'] : [];
    const r = await runCommand('node', ['--import', 'tsx', '--test', '--test-reporter=spec', ...serial, ...files], env);
    tallies.push(nodeTally(`${folder} tests`, r));
  }
} catch (err) {
  console.error(`[setwright] the test set-up failed: ${(err as Error).stack ?? err}`);
  tallies.push({ stage: 'set-up', passed: 0, failed: 1 });
} finally {
  cleanUp();
}

const minutes = ((Date.now() - started) / 60000).toFixed(1);
console.log('');
for (const t of tallies) console.log(`  ${t.stage.padEnd(18)} ${t.passed} passed, ${t.failed} failed`);
console.log(`  (took ${minutes} min)`);
const passed = tallies.reduce((n, t) => n + t.passed, 0);
const failed = tallies.reduce((n, t) => n + t.failed, 0);
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed > 0 || tallies.length === 0 ? 1 : 0);
