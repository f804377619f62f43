import { Router } from 'express';
import { z } from 'zod';
import { EXPIRING_WITHIN_DAYS, grantSchema, revokeSchema, type GrantRequest, type RevokeRequest } from '../../contracts/competencies';
import { allow } from '../../lib/access';
import { validate, validated } from '../../lib/validate';
import { matrixCsv } from './csv';
import type { CompetencyService } from './service';

const idParams = z.object({ id: z.uuid({ error: 'An authorisation id is a UUID.' }) });
const historyQuery = z.object({
  personId: z.uuid({ error: 'A person id is a UUID.' }).optional(),
  procedureKey: z.string().min(1).max(60).optional(),
});
const expiringQuery = z.object({
  withinDays: z.coerce.number({ error: 'Give a number of days.' }).int('Give a whole number of days.').min(0).max(366).default(EXPIRING_WITHIN_DAYS),
});
const READERS = ['competent_person', 'workshop_admin', 'auditor'] as const;

/** The competency matrix, its CSV export, and authorisations granted and withdrawn by competent persons. */
export function competenciesRouter(competencies: CompetencyService, timeZone: string): Router {
  const router = Router();

  router.get('/matrix', allow(...READERS), async (_req, res) => {
    res.json(await competencies.matrix());
  });

  router.get('/matrix.csv', allow(...READERS), async (_req, res) => {
    const matrix = await competencies.matrix();
    res
      .type('text/csv; charset=utf-8')
      .attachment(`competency-matrix-${matrix.today}.csv`)
      .send(matrixCsv(matrix, timeZone));
  });

  router.get('/authorisations', allow(...READERS), validate({ query: historyQuery }), async (_req, res) => {
    res.json(await competencies.history(validated<z.infer<typeof historyQuery>>(res, 'query')));
  });

  router.post('/authorisations', allow('competent_person'), validate({ body: grantSchema }), async (req, res) => {
    const granted = await competencies.grant(req.user!, validated<GrantRequest>(res, 'body'));
    res.status(201).location(`/api/competencies/authorisations/${granted.id}`).json(granted);
  });

  router.post('/authorisations/:id/revoke', allow('competent_person', 'workshop_admin'), validate({ params: idParams, body: revokeSchema }), async (req, res) => {
    const { id } = validated<z.infer<typeof idParams>>(res, 'params');
    res.json(await competencies.revoke(req.user!, id, validated<RevokeRequest>(res, 'body').reason));
  });

  router.get('/expiring', allow(...READERS), validate({ query: expiringQuery }), async (_req, res) => {
    res.json(await competencies.expiring(validated<z.infer<typeof expiringQuery>>(res, 'query').withinDays));
  });

  return router;
}
