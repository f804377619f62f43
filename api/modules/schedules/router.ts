import { Router } from 'express';
import { allow } from '../../lib/access';
import type { MachineStatusService } from './service';

/** The check schedules across the register. */
export function schedulesRouter(status: MachineStatusService): Router {
  const router = Router();
  // Everyone who acts on due checks: those who run them, sign them and keep the schedules.
  router.get('/due', allow('trainee', 'competent_person', 'workshop_admin'), async (_req, res) => {
    res.json(await status.dueList());
  });
  return router;
}
