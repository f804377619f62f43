import { Router } from 'express';
import { z } from 'zod';
import { addendumSchema, sendBackSchema, signOffSchema } from '../../contracts/signoff';
import { allow, ANY_ROLE } from '../../lib/access';
import { validate, validated } from '../../lib/validate';
import type { RecordService } from '../records/service';
import type { SignOffService } from './service';

const idParams = z.object({ id: z.uuid({ error: 'A record id is a UUID.' }) });
type Id = z.infer<typeof idParams>;

/** The queue of records waiting for a competent person's signature. */
export function signOffQueueRouter(signOff: SignOffService): Router {
  const router = Router();
  router.get('/queue', allow('competent_person'), async (_req, res) => {
    res.json(await signOff.queue());
  });
  return router;
}

/** Sign-off, send-back, addenda, the record check and the audit trail of one record (mounted under /records). */
export function signOffRouter(signOff: SignOffService, records: RecordService): Router {
  const router = Router();

  router.get('/:id/signatures', allow(...ANY_ROLE), validate({ params: idParams }), async (req, res) => {
    const { id } = validated<Id>(res, 'params');
    await records.assertReadable(req.user!, id); // the same read rule as the record itself
    res.json(await signOff.detail(id));
  });

  router.post('/:id/sign-off', allow('competent_person'), validate({ params: idParams, body: signOffSchema }), async (req, res) => {
    const { id } = validated<Id>(res, 'params');
    res.json(await signOff.signOff(req.user!, id, validated<z.infer<typeof signOffSchema>>(res, 'body').password));
  });

  router.post('/:id/send-back', allow('competent_person'), validate({ params: idParams, body: sendBackSchema }), async (req, res) => {
    const { id } = validated<Id>(res, 'params');
    res.json(await signOff.sendBack(req.user!, id, validated<z.infer<typeof sendBackSchema>>(res, 'body').reason));
  });

  router.post('/:id/addenda', allow('competent_person', 'workshop_admin'), validate({ params: idParams, body: addendumSchema }), async (req, res) => {
    const { id } = validated<Id>(res, 'params');
    const body = validated<z.infer<typeof addendumSchema>>(res, 'body');
    res.status(201).json(await signOff.addAddendum(req.user!, id, body.text, body.password));
  });

  router.get('/:id/check', allow(...ANY_ROLE), validate({ params: idParams }), async (req, res) => {
    const { id } = validated<Id>(res, 'params');
    await records.assertReadable(req.user!, id);
    res.json(await signOff.check(id, req.user!.id));
  });

  router.get('/:id/audit', allow('competent_person', 'auditor', 'workshop_admin'), validate({ params: idParams }), async (req, res) => {
    const { id } = validated<Id>(res, 'params');
    res.json(await signOff.auditTrail(id));
  });

  return router;
}
