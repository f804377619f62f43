import { Router } from 'express';
import { z } from 'zod';
import type { ProcedureVersionDetail, ProcedureVersionSummary } from '../../contracts/procedures';
import { allow, ANY_ROLE } from '../../lib/access';
import { AppError } from '../../lib/errors';
import { validate, validated } from '../../lib/validate';
import { ProcedureVersion } from './model';

const summary = (v: ProcedureVersion): ProcedureVersionSummary => ({
  id: v.id,
  key: v.key,
  version: v.version,
  title: v.title,
  machineKind: v.machineKind,
  status: v.status,
  checksum: v.checksum,
  approvedAt: v.approvedAt ? v.approvedAt.toISOString() : null,
});

const listQuery = z.object({ machineKind: z.string().max(40).optional(), all: z.enum(['1', 'true']).optional() });
const versionParams = z.object({ key: z.string().min(1).max(60), version: z.coerce.number().int().min(1) });

/** The procedure library: everyone reads approved versions; drafts and history are for admins and competent persons. */
export function proceduresRouter(): Router {
  const router = Router();
  router.get('/', allow(...ANY_ROLE), validate({ query: listQuery }), async (req, res) => {
    const q = validated<z.infer<typeof listQuery>>(res, 'query');
    const seesAll = req.user!.roles.some((r) => r === 'workshop_admin' || r === 'competent_person' || r === 'auditor');
    const where: Record<string, unknown> = {};
    if (!(q.all && seesAll)) where['status'] = 'approved';
    if (q.machineKind) where['machineKind'] = q.machineKind;
    const rows = await ProcedureVersion.findAll({ where, order: [['title', 'ASC'], ['version', 'DESC']] });
    res.json(rows.map(summary));
  });
  router.get('/:key/versions/:version', allow(...ANY_ROLE), validate({ params: versionParams }), async (req, res) => {
    const p = validated<z.infer<typeof versionParams>>(res, 'params');
    const row = await ProcedureVersion.findOne({ where: { key: p.key, version: p.version } });
    if (!row) throw AppError.notFound('There is no such procedure version.');
    const detail: ProcedureVersionDetail = { ...summary(row), body: row.body };
    res.json(detail);
  });
  return router;
}
