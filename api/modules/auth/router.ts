import { Router, type CookieOptions, type Response } from 'express';
import { rateLimit } from 'express-rate-limit';
import type { Config } from '../../config';
import { loginRequestSchema, type LoginRequest } from '../../contracts/auth';
import { AppError } from '../../lib/errors';
import type { ThrottleStores } from '../../lib/throttle-store';
import { validate, validated } from '../../lib/validate';
import type { AuthService, IssuedSession } from './service';

export const REFRESH_COOKIE = 'sw_refresh';

function tooManyAttempts(detail: string) {
  return () => {
    throw new AppError(429, 'too-many-sign-in-attempts', 'Too many sign-in attempts', detail);
  };
}

/**
 * Sign-in, refresh and sign-out: the only /api routes open without a token (besides health).
 * The throttles count in `throttles` (PostgreSQL), so every API instance counts the same tries.
 */
export function authRouter(auth: AuthService, config: Config, throttles: ThrottleStores): Router {
  const router = Router();
  const cookie: CookieOptions = {
    httpOnly: true,
    sameSite: 'strict',
    secure: config.COOKIE_SECURE ? config.COOKIE_SECURE === 'true' : config.NODE_ENV === 'production',
    path: '/api/auth',
  };
  const send = (res: Response, session: IssuedSession) => {
    res.cookie(REFRESH_COOKIE, session.refreshToken, { ...cookie, expires: session.refreshExpires });
    res.set('Cache-Control', 'no-store').json(session.response);
  };

  const perAddress = rateLimit({
    windowMs: config.LOGIN_WINDOW_SECONDS * 1000,
    limit: config.LOGIN_LIMIT_PER_ADDRESS,
    store: throttles('sign-in-address'),
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: tooManyAttempts('Too many sign-in attempts from this device. Wait a few minutes and try again.'),
  });
  const perAccount = rateLimit({
    windowMs: config.LOGIN_WINDOW_SECONDS * 1000,
    limit: config.LOGIN_LIMIT_PER_ACCOUNT,
    store: throttles('sign-in-account'),
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    keyGenerator: (req) => 'account:' + String((req.body as { email?: unknown } | undefined)?.email ?? '').trim().toLowerCase(),
    handler: tooManyAttempts('Too many failed sign-ins for this account. Wait a few minutes, or ask a workshop admin.'),
  });

  router.post('/login', perAddress, perAccount, validate({ body: loginRequestSchema }), async (req, res) => {
    const body = validated<LoginRequest>(res, 'body');
    send(res, await auth.signIn(body.email, body.password));
  });

  router.post('/refresh', async (req, res) => {
    send(res, await auth.refresh(req.cookies?.[REFRESH_COOKIE]));
  });

  router.post('/logout', async (req, res) => {
    await auth.signOut(req.cookies?.[REFRESH_COOKIE]);
    res.clearCookie(REFRESH_COOKIE, cookie).status(204).end();
  });

  return router;
}
