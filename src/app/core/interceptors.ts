import { HttpErrorResponse, type HttpInterceptorFn } from '@angular/common/http';
import { inject } from '@angular/core';
import { MatSnackBar } from '@angular/material/snack-bar';
import { catchError, from, switchMap, throwError } from 'rxjs';
import { toProblem } from './problem';
import { OWN_ERRORS, Session } from './session';

/** Adds the access token to API calls; on a 401 it renews once through the refresh cookie and retries. */
export const tokenInterceptor: HttpInterceptorFn = (req, next) => {
  const session = inject(Session);
  if (!req.url.startsWith('/api/') || req.url.startsWith('/api/auth/')) return next(req);
  const withToken = () => {
    const token = session.token();
    return next(token ? req.clone({ setHeaders: { Authorization: `Bearer ${token}` } }) : req);
  };
  return withToken().pipe(
    catchError((err: unknown) => {
      if (!(err instanceof HttpErrorResponse) || err.status !== 401) return throwError(() => err);
      return from(session.refresh()).pipe(switchMap((ok) => (ok ? withToken() : throwError(() => err))));
    }),
  );
};

/**
 * Every failure becomes one Problem shape. Field problems are left to the form that sent
 * them; anything else shows in a snackbar; a 401 that survived renewal signs the person out.
 */
export const problemInterceptor: HttpInterceptorFn = (req, next) => {
  const snackBar = inject(MatSnackBar);
  const session = inject(Session);
  return next(req).pipe(
    catchError((err: unknown) => {
      const problem = toProblem(err);
      if (!req.context.get(OWN_ERRORS)) {
        if (problem.status === 401) {
          void session.signOut('expired');
        } else if (!problem.errors?.length) {
          snackBar.open(problem.detail ? `${problem.title}: ${problem.detail}` : problem.title, 'Dismiss', {
            duration: 8000,
            politeness: 'assertive',
          });
        }
      }
      return throwError(() => problem);
    }),
  );
};
