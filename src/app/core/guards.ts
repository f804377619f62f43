import { inject } from '@angular/core';
import { Router, type CanMatchFn } from '@angular/router';
import type { Role } from '@setwright/contracts/roles';
import { Session } from './session';

/** Signed-in people only; others go to the sign-in page and come back afterwards. */
export const signedInGuard: CanMatchFn = async (_route, segments) => {
  const session = inject(Session);
  const router = inject(Router);
  if (session.signedIn() || (await session.refresh())) return true;
  const next = '/' + segments.map((s) => s.path).join('/');
  return router.createUrlTree(['/sign-in'], { queryParams: next !== '/' ? { next } : {} });
};

/** Only people holding one of these roles; others go to Today, which says what they can do. */
export function roleGuard(...roles: Role[]): CanMatchFn {
  return () => {
    const session = inject(Session);
    const router = inject(Router);
    return session.hasAnyRole(roles) ? true : router.createUrlTree(['/today'], { queryParams: { denied: 1 } });
  };
}

/** The sign-in page is for signed-out people. */
export const signedOutGuard: CanMatchFn = () => {
  const session = inject(Session);
  return session.signedIn() ? inject(Router).createUrlTree(['/today']) : true;
};
