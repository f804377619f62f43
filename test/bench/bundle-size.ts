// Initial JavaScript transfer size of the production build (not a test): the gzip size of every
// script the index page loads before any lazy route. Run after `npx ng build`.
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { ROOT } from '../../scripts/lib/stack';

const dist = join(ROOT, 'dist', 'setwright', 'browser');
const index = readFileSync(join(dist, 'index.html'), 'utf8');
const initial = new Set([...index.matchAll(/(?:src|href)="([^"]+\.js)"/g)].map((m) => m[1]!));
// modulepreload links name the initial chunks; main-*.js and polyfills-*.js load them.
let raw = 0;
let gz = 0;
for (const file of initial) {
  const bytes = readFileSync(join(dist, file));
  raw += bytes.length;
  gz += gzipSync(bytes, { level: 9 }).length;
}
const all = readdirSync(dist).filter((f) => f.endsWith('.js'));
console.log(`| initial JS (goal ≤ 180 kB gzip) | ${(gz / 1024).toFixed(1)} kB gzip | ${(raw / 1024).toFixed(1)} kB raw | ${initial.size} of ${all.length} files |`);
