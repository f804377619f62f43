import { Router } from 'express';
import { z } from 'zod';
import {
  bladeTypeSchema,
  bladeTypeUpdateSchema,
  cutLogSchema,
  removalSchema,
  type BladeTypeRequest,
  type BladeTypeUpdate,
  type CutLogRequest,
  type RemovalRequest,
} from '../../contracts/blades';
import { allow, ANY_ROLE } from '../../lib/access';
import { validate, validated } from '../../lib/validate';
import type { BladeService } from './service';

const idParams = z.object({ id: z.uuid({ error: 'An id is a UUID.' }) });
type Id = z.infer<typeof idParams>;

/** The Blades place: everyone reads; workshop admins keep the stock list; the people at the saw log cuts. */
export function bladesRouter(blades: BladeService): Router {
  const router = Router();

  router.get('/types', allow(...ANY_ROLE), async (_req, res) => {
    res.json(await blades.listTypes());
  });

  router.post('/types', allow('workshop_admin'), validate({ body: bladeTypeSchema }), async (_req, res) => {
    const { type, created } = await blades.createType(validated<BladeTypeRequest>(res, 'body'));
    res.status(created ? 201 : 200).location(`/api/blades/types/${type.id}`).json(type);
  });

  router.get('/types/:id', allow(...ANY_ROLE), validate({ params: idParams }), async (_req, res) => {
    res.json(await blades.type(validated<Id>(res, 'params').id));
  });

  router.patch('/types/:id', allow('workshop_admin'), validate({ params: idParams, body: bladeTypeUpdateSchema }), async (_req, res) => {
    res.json(await blades.updateType(validated<Id>(res, 'params').id, validated<BladeTypeUpdate>(res, 'body')));
  });

  router.get('/machines', allow(...ANY_ROLE), async (_req, res) => {
    res.json(await blades.onEachMachine());
  });

  router.get('/machines/:id', allow(...ANY_ROLE), validate({ params: idParams }), async (_req, res) => {
    res.json(await blades.machineBlades(validated<Id>(res, 'params').id));
  });

  router.get('/fittings/:id', allow(...ANY_ROLE), validate({ params: idParams }), async (_req, res) => {
    res.json(await blades.fitting(validated<Id>(res, 'params').id));
  });

  router.post('/fittings/:id/removal', allow('competent_person', 'workshop_admin'), validate({ params: idParams, body: removalSchema }), async (req, res) => {
    res.json(await blades.remove(req.user!, validated<Id>(res, 'params').id, validated<RemovalRequest>(res, 'body')));
  });

  router.post('/fittings/:id/cuts', allow('trainee', 'competent_person', 'workshop_admin'), validate({ params: idParams, body: cutLogSchema }), async (req, res) => {
    res.status(201).json(await blades.logCuts(req.user!, validated<Id>(res, 'params').id, validated<CutLogRequest>(res, 'body')));
  });

  return router;
}
