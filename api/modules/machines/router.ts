import { Router } from 'express';
import { z } from 'zod';
import { allow, ANY_ROLE } from '../../lib/access';
import { AppError } from '../../lib/errors';
import { validate, validated } from '../../lib/validate';
import { findMachine, listMachines } from './repository';

const idParams = z.object({ id: z.uuid({ error: 'A machine id is a UUID.' }) });

/** The machine register, read by every role. */
export function machinesRouter(): Router {
  const router = Router();
  router.get('/', allow(...ANY_ROLE), async (_req, res) => {
    res.json(await listMachines());
  });
  router.get('/:id', allow(...ANY_ROLE), validate({ params: idParams }), async (_req, res) => {
    const { id } = validated<z.infer<typeof idParams>>(res, 'params');
    const machine = await findMachine(id);
    if (!machine) throw AppError.notFound('There is no machine with that id.');
    res.json(machine);
  });
  return router;
}
