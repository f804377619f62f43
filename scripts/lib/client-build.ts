// The client build is skipped when nothing it is built from has changed since the last build:
// a SHA-256 over the content of every input file, kept beside the build output.
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { ROOT } from './stack';

/** What the production build reads: the client, the code it shares with the API, and the build settings. */
const INPUTS = ['src', 'public', 'procedures', 'api/contracts', 'angular.json', 'ngsw-config.json', 'package-lock.json', 'tsconfig.json', 'tsconfig.app.json'];
const OUTPUT = join(ROOT, 'dist', 'setwright');
const STAMP = join(OUTPUT, '.inputs-sha256');

function files(path: string): string[] {
  if (!existsSync(path)) return [];
  if (!statSync(path).isDirectory()) return [path];
  return readdirSync(path, { withFileTypes: true })
    .sort((a, b) => (a.name < b.name ? -1 : 1))
    .flatMap((e) => files(join(path, e.name)));
}

/** The fingerprint of the build's inputs as they are now. */
export function clientInputsHash(): string {
  const hash = createHash('sha256');
  for (const input of INPUTS) {
    for (const file of files(join(ROOT, input))) {
      // Client specs are not part of the production build.
      if (file.endsWith('.spec.ts')) continue;
      hash.update(relative(ROOT, file)).update('\0').update(readFileSync(file)).update('\0');
    }
  }
  return hash.digest('hex');
}

/** True when the last build was made from exactly these inputs and its output is still there. */
export function clientBuildIsCurrent(hash: string): boolean {
  return existsSync(join(OUTPUT, 'browser', 'index.html')) && existsSync(STAMP) && readFileSync(STAMP, 'utf8').trim() === hash;
}

export function markClientBuilt(hash: string): void {
  writeFileSync(STAMP, hash + '\n');
}
