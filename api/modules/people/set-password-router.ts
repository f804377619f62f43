import { Router } from 'express';
import { rateLimit } from 'express-rate-limit';
import type { Config } from '../../config';
import { setPasswordRequestSchema, type SetPasswordRequest } from '../../contracts/people';
import { AppError } from '../../lib/errors';
import type { ThrottleStores } from '../../lib/throttle-store';
import { validate, validated } from '../../lib/validate';
import type { PeopleService } from './service';

/**
 * POST /api/auth/set-password: open (the invitation link is the credential), throttled per address
 * with the sign-in limits so nobody can try tokens by the thousand (counted in PostgreSQL, shared by every instance).
 */
export function setPasswordRouter(people: PeopleService, config: Config, throttles: ThrottleStores): Router {
  const router = Router();
  const perAddress = rateLimit({
    windowMs: config.LOGIN_WINDOW_SECONDS * 1000,
    limit: config.LOGIN_LIMIT_PER_ADDRESS,
    store: throttles('set-password-address'),
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: () => {
      throw new AppError(429, 'too-many-attempts', 'Too many attempts', 'Too many tries from this device. Wait a few minutes and try again.');
    },
  });
  router.post('/set-password', perAddress, validate({ body: setPasswordRequestSchema }), async (_req, res) => {
    const body = validated<SetPasswordRequest>(res, 'body');
    res.json(await people.setPassword(body.token, body.password));
  });
  return router;
}
