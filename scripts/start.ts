// `npm start`: the local database, migrations and demo data, the production build, and one server.
import { join } from 'node:path';
import { DEMO_PASSWORD, DEMO_PEOPLE } from '../api/db/seed';
import { ROLE_LABELS } from '../api/contracts/roles';
import { clientBuildIsCurrent, clientInputsHash, markClientBuilt } from './lib/client-build';
import { buildApiBundle, spawnApi, waitForApi } from './lib/api-bundle';
import { runCommand } from './lib/run';
import { LOCAL_S3_DIR, localPgDir, localSecrets, prepareDatabase, ROOT, say, startStack } from './lib/stack';

const secrets = localSecrets(join(ROOT, '.data'));
const stack = await startStack({
  pgDir: localPgDir(),
  pgPort: Number(process.env['SETWRIGHT_DB_PORT'] ?? 54329),
  s3Dir: LOCAL_S3_DIR,
  s3Port: Number(process.env['SETWRIGHT_S3_PORT'] ?? 54380),
  apiPort: Number(process.env['PORT'] ?? 4300),
  secrets,
  nodeEnv: 'production',
});

let stopping = false;
async function shutdown(code: number, api?: { stop(): Promise<void> }) {
  if (stopping) return;
  stopping = true;
  say('stopping…');
  try {
    await api?.stop();
  } finally {
    stack.stop();
    process.exit(code);
  }
}

try {
  await prepareDatabase(stack.env);
  if (process.env['SETWRIGHT_SKIP_BUILD'] !== '1') {
    const inputs = clientInputsHash();
    if (process.env['SETWRIGHT_FORCE_BUILD'] !== '1' && clientBuildIsCurrent(inputs)) {
      say('the client app is already built from these sources (SETWRIGHT_FORCE_BUILD=1 builds it again)');
    } else {
      say('building the client app (production)…');
      const build = await runCommand('npx', ['ng', 'build', '--progress=false']);
      if (build.code !== 0) throw new Error('the client build failed');
      markClientBuilt(inputs);
    }
  }
  // The API in a process of its own, from its bundle (see scripts/lib/api-bundle.ts).
  await buildApiBundle();
  const url = `http://127.0.0.1:${stack.env['PORT']}`;
  const child = spawnApi({ ...stack.env, PUBLIC_URL: url, COOKIE_SECURE: 'false' });
  const api = {
    url,
    stop: () =>
      new Promise<void>((resolve) => {
        if (child.exitCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill('SIGTERM');
      }),
  };
  child.once('exit', (code) => {
    if (stopping) return;
    if (code !== 0) console.error(`[setwright] the API process stopped (exit ${code}).`);
    void shutdown(code === 0 ? 0 : 1);
  });
  process.once('SIGINT', () => void shutdown(0, api));
  process.once('SIGTERM', () => void shutdown(0, api));
  await waitForApi(`${url}/api/health`, () => child.exitCode !== null);
  say(`Setwright is ready at ${api.url}  (Ctrl-C stops the server and the database)`);
  say(`demo sign-ins (password for all: ${DEMO_PASSWORD}):`);
  for (const p of DEMO_PEOPLE) say(`  ${p.roles.map((r) => ROLE_LABELS[r]).join(' + ').padEnd(34)} ${p.email}`);
} catch (err) {
  console.error(`[setwright] could not start: ${(err as Error).message}`);
  await shutdown(1);
}
