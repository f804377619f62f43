import type { RequestHandler } from 'express';
import passport from 'passport';
import { ExtractJwt, Strategy as JwtStrategy } from 'passport-jwt';
import type { Role } from '../contracts/roles';
import { findPersonById, type Person } from '../modules/people/repository';
import type { TokenService } from '../modules/auth/tokens';
import { AppError } from './errors';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends Person {}
  }
}

/**
 * A passport instance of its own per app (tests build many apps), with the JWT strategy:
 * HS256 only, issuer and audience checked, and the person looked up on every request so a
 * deactivated person's tokens stop working at once.
 */
export function createPassport(tokens: TokenService): passport.PassportStatic {
  const instance = new passport.Passport() as passport.PassportStatic;
  instance.use(
    new JwtStrategy(
      {
        jwtFromRequest: ExtractJwt.fromAuthHeaderAsBearerToken(),
        secretOrKey: tokens.key as unknown as string,
        algorithms: ['HS256'],
        issuer: tokens.issuer,
        audience: tokens.audience,
      },
      (payload: { sub?: string }, done: (err: unknown, user?: Person | false) => void) => {
        if (!payload.sub) return done(null, false);
        findPersonById(payload.sub).then(
          (person) => done(null, person && person.active ? person : false),
          (err) => done(err),
        );
      },
    ),
  );
  return instance;
}

/** Require a valid access token; anything else is a 401 problem. */
export function requireSignIn(instance: passport.PassportStatic): RequestHandler {
  return (req, res, next) => {
    instance.authenticate('jwt', { session: false }, (err: unknown, user: Person | false) => {
      if (err) return next(err);
      if (!user) return next(AppError.unauthorised('Your sign-in is missing, expired or not valid. Sign in again.'));
      req.user = user;
      next();
    })(req, res, next);
  };
}

/** Everyone signed in, whatever their role. */
export const ANY_ROLE: readonly Role[] = ['trainee', 'competent_person', 'auditor', 'workshop_admin'];

/** The role check every route declares: the person must hold at least one of these roles. */
export function allow(...roles: readonly Role[]): RequestHandler {
  return (req, _res, next) => {
    const held = req.user?.roles ?? [];
    if (!req.user) throw AppError.unauthorised();
    if (!roles.some((r) => held.includes(r))) {
      throw AppError.forbidden(`This needs one of these roles: ${roles.join(', ')}.`);
    }
    next();
  };
}
