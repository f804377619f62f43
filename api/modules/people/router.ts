import { Router } from 'express';
import { allow, ANY_ROLE } from '../../lib/access';

/** The signed-in person. */
export function peopleRouter(): Router {
  const router = Router();
  router.get('/me', allow(...ANY_ROLE), (req, res) => {
    const { id, email, displayName, roles } = req.user!;
    res.json({ id, email, displayName, roles });
  });
  return router;
}
