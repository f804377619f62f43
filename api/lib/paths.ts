import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';

/**
 * The project's folder, found by walking up from this file to Setwright's package.json: the same
 * answer when the API runs from its TypeScript sources (tsx, tests) and from the bundle that
 * `npm start` builds into dist/api/.
 */
function projectRoot(): string {
  for (let dir = import.meta.dirname; ; dir = dirname(dir)) {
    const manifest = join(dir, 'package.json');
    if (existsSync(manifest) && (JSON.parse(readFileSync(manifest, 'utf8')) as { name?: string }).name === 'setwright') return dir;
    if (dirname(dir) === dir) throw new Error(`Setwright's package.json was not found above ${import.meta.dirname}`);
  }
}

export const PROJECT_ROOT = projectRoot();
/** Fonts for PDFs and QR label sheets, shipped with the API. */
export const FONT_DIR = join(PROJECT_ROOT, 'api', 'assets', 'fonts');
/** The shipped procedure packs. */
export const PACKS_DIR = join(PROJECT_ROOT, 'procedures');
