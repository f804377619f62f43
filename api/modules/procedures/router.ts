import { Router } from 'express';
import { z } from 'zod';
import { diffQuerySchema, startDraftSchema, type StartDraftRequest } from '../../contracts/procedures';
import { allow, ANY_ROLE } from '../../lib/access';
import { validate, validated } from '../../lib/validate';
import { ProcedureVersion } from './model';
import { ProcedureService } from './service';

const listQuery = z.object({ machineKind: z.string().max(40).optional(), all: z.enum(['1', 'true']).optional() });
const keyParams = z.object({ key: z.string().min(1).max(60) });
const versionParams = keyParams.extend({ version: z.coerce.number().int().min(1) });
type VersionParams = z.infer<typeof versionParams>;

/** Roles that read drafts and history; trainees read approved versions only (the service enforces it). */
const READERS = ['workshop_admin', 'competent_person', 'auditor'] as const;
/** Approval needs a competent person or a workshop admin, and never the draft's author (the service enforces that). */
const APPROVERS = ['competent_person', 'workshop_admin'] as const;

/**
 * The procedure library: everyone reads approved versions; readers see drafts and history;
 * workshop admins write drafts; a competent person or admin other than the author approves them.
 * The service defaults to the models' own database (the one createApp was given).
 */
export function proceduresRouter(procedures = new ProcedureService(ProcedureVersion.sequelize!)): Router {
  const router = Router();

  router.get('/', allow(...ANY_ROLE), validate({ query: listQuery }), async (req, res) => {
    const q = validated<z.infer<typeof listQuery>>(res, 'query');
    res.json(await procedures.list(req.user!, { machineKind: q.machineKind, all: !!q.all }));
  });

  router.get('/:key/versions', allow(...ANY_ROLE), validate({ params: keyParams }), async (req, res) => {
    res.json(await procedures.versions(req.user!, validated<z.infer<typeof keyParams>>(res, 'params').key));
  });

  router.post('/:key/drafts', allow('workshop_admin'), validate({ params: keyParams, body: startDraftSchema }), async (req, res) => {
    const { key } = validated<z.infer<typeof keyParams>>(res, 'params');
    const draft = await procedures.startDraft(req.user!, key, validated<StartDraftRequest>(res, 'body').from);
    res.status(201).location(`/api/procedures/${encodeURIComponent(draft.key)}/versions/${draft.version}`).json(draft);
  });

  router.get('/:key/versions/:version', allow(...ANY_ROLE), validate({ params: versionParams }), async (req, res) => {
    const p = validated<VersionParams>(res, 'params');
    res.json(await procedures.get(req.user!, p.key, p.version));
  });

  // The body is the whole procedure, validated in the service so its problems point into it ('#/steps/2/title').
  router.put('/:key/versions/:version', allow('workshop_admin'), validate({ params: versionParams }), async (req, res) => {
    const p = validated<VersionParams>(res, 'params');
    res.json(await procedures.saveDraft(req.user!, p.key, p.version, req.body));
  });

  // Its author or any workshop admin; the service checks which.
  router.delete('/:key/versions/:version', allow(...ANY_ROLE), validate({ params: versionParams }), async (req, res) => {
    const p = validated<VersionParams>(res, 'params');
    await procedures.deleteDraft(req.user!, p.key, p.version);
    res.status(204).end();
  });

  router.get('/:key/versions/:version/diff', allow(...READERS), validate({ params: versionParams, query: diffQuerySchema }), async (req, res) => {
    const p = validated<VersionParams>(res, 'params');
    const q = validated<z.infer<typeof diffQuerySchema>>(res, 'query');
    res.json(await procedures.diff(req.user!, p.key, p.version, q.against));
  });

  router.post('/:key/versions/:version/approve', allow(...APPROVERS), validate({ params: versionParams }), async (req, res) => {
    const p = validated<VersionParams>(res, 'params');
    res.json(await procedures.approve(req.user!, p.key, p.version));
  });

  return router;
}
