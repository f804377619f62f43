import type { Transaction } from 'sequelize';
import type { Procedure } from '../../../procedures/schema';
import { ProcedureVersion } from './model';

/**
 * Procedure bodies by version id, read once a process. Only approved and retired versions are
 * kept: their body is frozen by a database trigger, so a kept copy can never go stale (a draft's
 * body may still change, so drafts are read each time). Bodies are shared: never change one.
 */
const frozen = new Map<string, Readonly<Procedure>>();
const MOST = 500;

export async function procedureBody(versionId: string, transaction?: Transaction): Promise<Readonly<Procedure>> {
  const kept = frozen.get(versionId);
  if (kept) return kept;
  const version = await ProcedureVersion.findByPk(versionId, { attributes: ['id', 'status', 'body'], transaction });
  if (!version) throw new Error(`procedure version ${versionId} is missing`);
  if (version.status !== 'draft') {
    if (frozen.size >= MOST) frozen.delete(frozen.keys().next().value!);
    frozen.set(versionId, version.body);
  }
  return version.body;
}
