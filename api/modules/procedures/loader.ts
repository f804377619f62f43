import { createHash } from 'node:crypto';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import canonicalize from 'canonicalize';
import type { Sequelize } from 'sequelize';
import { procedureSchema, type Procedure } from '../../../procedures/schema';
import { ProcedureVersion } from './model';
import { PACKS_DIR } from '../../lib/paths';

export { PACKS_DIR };
const PACKS = ['bandsaw'];

/** SHA-256 of a procedure's canonical JSON (RFC 8785 key order), so the same content always has the same checksum. */
export function procedureChecksum(body: Procedure): string {
  return createHash('sha256').update(canonicalize(body) ?? '').digest('hex');
}

export interface PackFile {
  file: string;
  body: Procedure;
  checksum: string;
}

/** Read and validate every procedure file of the content packs: <pack>/<key>/v<version>.json. */
export function readPackFiles(root = PACKS_DIR, packs = PACKS): PackFile[] {
  const out: PackFile[] = [];
  for (const pack of packs) {
    const packDir = join(root, pack);
    let keys: string[] = [];
    try {
      keys = readdirSync(packDir).filter((k) => statSync(join(packDir, k)).isDirectory());
    } catch {
      continue;
    }
    for (const key of keys.sort()) {
      for (const name of readdirSync(join(packDir, key)).filter((f) => /^v\d+\.json$/.test(f)).sort()) {
        const file = join(pack, key, name);
        const parsed = procedureSchema.safeParse(JSON.parse(readFileSync(join(packDir, key, name), 'utf8')));
        if (!parsed.success) {
          const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`).join('\n');
          throw new Error(`The procedure file ${file} is not valid:\n${lines}`);
        }
        const body = parsed.data;
        if (body.key !== key || `v${body.version}.json` !== name) {
          throw new Error(`The procedure file ${file} says key "${body.key}" version ${body.version}; its folder and name must match.`);
        }
        out.push({ file, body, checksum: procedureChecksum(body) });
      }
    }
  }
  return out;
}

/**
 * Load new pack versions into the database as approved (retiring the older approved version of the
 * same key). A file whose content changed but kept its version number stops start-up.
 */
export async function loadProcedurePacks(sequelize: Sequelize, files = readPackFiles()): Promise<string[]> {
  const loaded: string[] = [];
  for (const f of files.sort((a, b) => a.body.key.localeCompare(b.body.key) || a.body.version - b.body.version)) {
    const existing = await ProcedureVersion.findOne({ where: { key: f.body.key, version: f.body.version } });
    if (existing) {
      if (existing.source === 'editor') {
        const newest = (await ProcedureVersion.max('version', { where: { key: f.body.key } })) as number;
        throw new Error(
          `The procedure file ${f.file} is version ${f.body.version} of "${f.body.key}", but that version number was already used by a version ` +
            `written in the app. Give the file a version number after the app's versions (v${newest + 1}.json).`,
        );
      }
      if (existing.checksum !== f.checksum) {
        throw new Error(
          `The procedure file ${f.file} has changed since version ${f.body.version} of "${f.body.key}" was loaded. ` +
            `Approved versions never change: give the changed file a new version number (v${f.body.version + 1}.json).`,
        );
      }
      continue;
    }
    await sequelize.transaction(async (transaction) => {
      const current = await ProcedureVersion.findOne({ where: { key: f.body.key, status: 'approved' }, transaction });
      if (current && current.version > f.body.version) {
        await ProcedureVersion.create(row(f, 'retired'), { transaction });
        return;
      }
      if (current) await current.update({ status: 'retired' }, { transaction });
      await ProcedureVersion.create(row(f, 'approved'), { transaction });
    });
    loaded.push(`${f.body.key} v${f.body.version}`);
  }
  return loaded;
}

function row(f: PackFile, status: 'approved' | 'retired') {
  return {
    key: f.body.key,
    version: f.body.version,
    title: f.body.title,
    machineKind: f.body.machineKind,
    status,
    body: f.body,
    checksum: f.checksum,
    source: 'pack' as const,
    approvedAt: new Date(),
  };
}
