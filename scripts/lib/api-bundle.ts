// The API runs in production from one bundled file (dist/api/main.mjs, made by esbuild from
// api/main.ts in about half a second), in a process of its own: plain Node without a TypeScript
// loader beside it uses about a third less memory than running the sources through tsx.
import { spawn, type ChildProcess } from 'node:child_process';
import { join } from 'node:path';
import { build } from 'esbuild';
import { ROOT } from './stack';

export const API_BUNDLE = join(ROOT, 'dist', 'api', 'main.mjs');

export async function buildApiBundle(): Promise<string> {
  await build({
    entryPoints: [join(ROOT, 'api', 'main.ts')],
    outfile: API_BUNDLE,
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    // npm packages load from node_modules as usual (native ones such as sharp and pg among them).
    packages: 'external',
    sourcemap: 'linked',
    logLevel: 'warning',
  });
  return API_BUNDLE;
}

/**
 * Environment for the API process. glibc gives each thread its own malloc arena; libvips (sharp)
 * decodes photos on several threads, so two arenas keep a photo's peak memory about half as high
 * (sharp's own advice for servers).
 */
export function apiProcessEnv(env: Record<string, string | undefined>): NodeJS.ProcessEnv {
  return { ...process.env, MALLOC_ARENA_MAX: '2', ...env };
}

/** Start the bundled API (`node dist/api/main.mjs`) with this environment. */
export function spawnApi(env: Record<string, string | undefined>, stdio: 'inherit' | 'quiet' = 'inherit'): ChildProcess {
  return spawn(process.execPath, ['--enable-source-maps', API_BUNDLE], {
    cwd: ROOT,
    env: apiProcessEnv(env),
    stdio: stdio === 'inherit' ? 'inherit' : ['ignore', 'ignore', 'pipe'],
  });
}

/** Wait until the API answers its health check (it migrates and loads the packs first). */
export async function waitForApi(healthUrl: string, ended: () => boolean, seconds = 120): Promise<void> {
  const until = Date.now() + seconds * 1000;
  while (Date.now() < until) {
    if (ended()) throw new Error('the API process stopped while starting');
    try {
      if ((await fetch(healthUrl)).status < 500) return;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`the API did not answer within ${seconds} s`);
}
