import { Router } from 'express';
import { rateLimit } from 'express-rate-limit';
import { z } from 'zod';
import { finishWithSignatureSchema } from '../../contracts/signoff';
import {
  RECORD_STATUSES,
  startRecordSchema,
  stepEntryRequestSchema,
  voidRecordSchema,
  type StartRecordRequest,
  type StepEntryRequest,
} from '../../contracts/records';
import type { Config } from '../../config';
import { allow, ANY_ROLE } from '../../lib/access';
import { AppError } from '../../lib/errors';
import type { ThrottleStores } from '../../lib/throttle-store';
import { validate, validated } from '../../lib/validate';
import type { RecordService } from './service';

const idParams = z.object({ id: z.uuid({ error: 'A record id is a UUID.' }) });
const listQuery = z.object({
  status: z.enum(RECORD_STATUSES).optional(),
  machineId: z.uuid().optional(),
  mine: z.enum(['1', 'true']).optional(),
});
/** `?without=procedure` leaves out the pinned procedure's body (a client that has it asks only for the entries and state). */
const detailQuery = z.object({ without: z.enum(['procedure'], { error: 'Only "procedure" can be left out.' }).optional() });
const RUNNERS = ['trainee', 'competent_person'] as const;

export function recordsRouter(records: RecordService, config: Config, throttles: ThrottleStores): Router {
  const router = Router();
  // Witness passwords are checked here too, so failed witness sign-ins are throttled like sign-ins (counted in PostgreSQL).
  const witnessThrottle = rateLimit({
    windowMs: config.LOGIN_WINDOW_SECONDS * 1000,
    limit: config.LOGIN_LIMIT_PER_ACCOUNT,
    store: throttles('witness-account'),
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    skip: (req) => !(req.body as { witness?: unknown } | undefined)?.witness,
    keyGenerator: (req) => 'witness:' + String((req.body as { witness?: { email?: unknown } }).witness?.email ?? '').trim().toLowerCase(),
    handler: () => {
      throw new AppError(429, 'too-many-sign-in-attempts', 'Too many witness attempts', 'Too many failed witness sign-ins for this account. Wait a few minutes.');
    },
  });

  router.get('/', allow(...ANY_ROLE), validate({ query: listQuery }), async (req, res) => {
    const q = validated<z.infer<typeof listQuery>>(res, 'query');
    res.json(await records.list(req.user!, { status: q.status, machineId: q.machineId, mine: !!q.mine }));
  });

  router.post('/', allow(...RUNNERS), validate({ body: startRecordSchema }), async (req, res) => {
    const { record, created } = await records.start(req.user!, validated<StartRecordRequest>(res, 'body'));
    res.status(created ? 201 : 200).location(`/api/records/${record.id}`).json(record);
  });

  router.get('/:id', allow(...ANY_ROLE), validate({ params: idParams, query: detailQuery }), async (req, res) => {
    const { id } = validated<z.infer<typeof idParams>>(res, 'params');
    const { without } = validated<z.infer<typeof detailQuery>>(res, 'query');
    res.json(without === 'procedure' ? await records.get(req.user!, id, { withProcedure: false }) : await records.get(req.user!, id));
  });

  router.post('/:id/entries', allow(...RUNNERS), witnessThrottle, validate({ params: idParams, body: stepEntryRequestSchema }), async (req, res) => {
    const { id } = validated<z.infer<typeof idParams>>(res, 'params');
    const { entry, created } = await records.saveStep(req.user!, id, validated<StepEntryRequest>(res, 'body'));
    res.status(created ? 201 : 200).json(entry);
  });

  router.post('/:id/finish', allow(...RUNNERS), validate({ params: idParams, body: finishWithSignatureSchema }), async (req, res) => {
    const { id } = validated<z.infer<typeof idParams>>(res, 'params');
    const body = validated<z.infer<typeof finishWithSignatureSchema>>(res, 'body');
    res.json(await records.finish(req.user!, id, body.acceptFailed, body.password));
  });

  router.post('/:id/void', allow('trainee', 'competent_person', 'workshop_admin'), validate({ params: idParams, body: voidRecordSchema }), async (req, res) => {
    const { id } = validated<z.infer<typeof idParams>>(res, 'params');
    res.json(await records.void(req.user!, id, validated<z.infer<typeof voidRecordSchema>>(res, 'body').reason));
  });

  return router;
}
