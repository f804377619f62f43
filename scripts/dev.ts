// `npm run dev`: the local database and demo data, the API restarted on change, and ng serve with a proxy to it.
import { spawn, type ChildProcess } from 'node:child_process';
import { join } from 'node:path';
import { localPgDir, localSecrets, prepareDatabase, ROOT, say, startStack } from './lib/stack';

const apiPort = Number(process.env['PORT'] ?? 4300);
const stack = await startStack({
  pgDir: localPgDir(),
  pgPort: Number(process.env['SETWRIGHT_DB_PORT'] ?? 54329),
  apiPort,
  secrets: localSecrets(join(ROOT, '.data')),
  nodeEnv: 'development',
});
await prepareDatabase(stack.env);

const env = { ...process.env, ...stack.env, COOKIE_SECURE: 'false', STATIC_DIR: '', PUBLIC_URL: 'http://127.0.0.1:4200' };
const children: ChildProcess[] = [
  spawn('npx', ['tsx', 'watch', '--clear-screen=false', 'api/main.ts'], { cwd: ROOT, env, stdio: 'inherit' }),
  spawn('npx', ['ng', 'serve', '--port', '4200'], { cwd: ROOT, env, stdio: 'inherit' }),
];
say(`client on http://127.0.0.1:4200 (API on ${apiPort}); Ctrl-C stops everything`);

let stopping = false;
function stop() {
  if (stopping) return;
  stopping = true;
  for (const child of children) child.kill('SIGTERM');
  stack.stop();
  process.exit(0);
}
process.once('SIGINT', stop);
process.once('SIGTERM', stop);
for (const child of children) child.once('exit', stop);
