import { pipeline } from 'node:stream/promises';
import { Router } from 'express';
import { z } from 'zod';
import { machineRequestSchema, type MachineRequest } from '../../contracts/machines';
import { machineSchedulesSchema, type MachineSchedulesRequest } from '../../contracts/schedules';
import { allow, ANY_ROLE } from '../../lib/access';
import { AppError } from '../../lib/errors';
import { validate, validated } from '../../lib/validate';
import type { PhotoService } from '../photos/service';
import { renderLabels } from './labels';
import type { MachineService } from './service';
import { machineTrends } from './trends';

const idParams = z.object({ id: z.uuid({ error: 'A machine id is a UUID.' }) });
type IdParams = z.infer<typeof idParams>;
const labelsQuery = z.object({
  ids: z
    .string()
    .optional()
    .transform((s) => (s === undefined ? undefined : s.split(',').map((x) => x.trim()).filter(Boolean)))
    .pipe(z.array(z.uuid({ error: 'List machine ids (UUIDs) separated by commas.' })).min(1, 'Name at least one machine, or leave ids out for all.').max(200).optional()),
});

export interface MachinesRouterOptions {
  /** Where QR codes lead: the app's public address (PUBLIC_URL); without it, the address the admin used. */
  publicUrl: string | undefined;
  workshopName: string;
}

/** The machine register: everyone reads it; workshop admins register and change machines, schedules and QR labels. */
export function machinesRouter(machines: MachineService, photos: PhotoService, options: MachinesRouterOptions): Router {
  const router = Router();

  router.get('/', allow(...ANY_ROLE), async (_req, res) => {
    res.json(await machines.list());
  });

  router.post('/', allow('workshop_admin'), validate({ body: machineRequestSchema }), async (req, res) => {
    const created = await machines.create(req.user!, validated<MachineRequest>(res, 'body'));
    res.status(201).location(`/api/machines/${created.id}`).json(created);
  });

  // Before '/:id', so the name is not read as an id.
  router.get('/labels.pdf', allow('workshop_admin'), validate({ query: labelsQuery }), async (req, res) => {
    const { ids } = validated<z.infer<typeof labelsQuery>>(res, 'query');
    const rows = await machines.forLabels(ids);
    if (!rows.length) throw AppError.notFound('There are no machines in the register to label.');
    const pdf = await renderLabels(rows, options.publicUrl ?? `${req.protocol}://${req.get('host')}`, options.workshopName);
    res
      .status(200)
      .type('application/pdf')
      .set('Content-Disposition', `inline; filename="qr-labels${rows.length === 1 ? `-${rows[0]!.assetTag.replace(/[^A-Za-z0-9._-]+/g, '-')}` : ''}.pdf"`)
      .send(pdf);
  });

  router.get('/:id', allow(...ANY_ROLE), validate({ params: idParams }), async (_req, res) => {
    res.json(await machines.detail(validated<IdParams>(res, 'params').id));
  });

  // Readings over time, with the limits in force and the drift rule's verdict: anyone who may see the machine page.
  router.get('/:id/trends', allow(...ANY_ROLE), validate({ params: idParams }), async (_req, res) => {
    res.json(await machineTrends(validated<IdParams>(res, 'params').id));
  });

  router.put('/:id', allow('workshop_admin'), validate({ params: idParams, body: machineRequestSchema }), async (req, res) => {
    const { id } = validated<IdParams>(res, 'params');
    res.json(await machines.update(req.user!, id, validated<MachineRequest>(res, 'body')));
  });

  router.put('/:id/schedules', allow('workshop_admin'), validate({ params: idParams, body: machineSchedulesSchema }), async (_req, res) => {
    const { id } = validated<IdParams>(res, 'params');
    res.json(await machines.setSchedules(id, validated<MachineSchedulesRequest>(res, 'body')));
  });

  router.get('/:id/photo', allow(...ANY_ROLE), validate({ params: idParams }), async (req, res) => {
    const photo = await machines.photo(validated<IdParams>(res, 'params').id);
    const object = await photos.open(photo, 'display');
    res.status(200).type('image/jpeg').set({ 'Cache-Control': 'private, max-age=3600', 'X-Content-Type-Options': 'nosniff', ETag: photos.etagOf(photo, 'display') });
    if (object.contentLength !== undefined) res.set('Content-Length', String(object.contentLength));
    try {
      await pipeline(object.body, res);
    } catch (err) {
      req.log.warn({ err, photo: photo.id }, 'a machine photo stream ended early');
    }
  });

  return router;
}
