import { HttpErrorResponse } from '@angular/common/http';
import type { AbstractControl, FormGroup } from '@angular/forms';

/** An RFC 9457 problem as the API sends it. */
export interface Problem {
  type: string;
  title: string;
  status: number;
  detail?: string;
  errors?: { pointer: string; detail: string }[];
}

/** Turn any HTTP failure into one Problem shape (a lost connection included). */
export function toProblem(error: unknown): Problem {
  if (isProblem(error)) return error;
  if (error instanceof HttpErrorResponse) {
    const body = error.error as Partial<Problem> | null;
    if (body && typeof body === 'object' && typeof body.title === 'string') {
      return { type: body.type ?? 'about:blank', title: body.title, status: body.status ?? error.status, detail: body.detail, errors: body.errors };
    }
    // 504 without a problem body: the service worker (or a gateway) could not reach the server.
    if (error.status === 0 || error.status === 504) {
      return { type: '/problems/offline', title: 'No connection', status: 0, detail: 'The server could not be reached. Check the workshop Wi-Fi and try again.' };
    }
    return { type: 'about:blank', title: error.statusText || 'Request failed', status: error.status };
  }
  return { type: 'about:blank', title: 'Something went wrong', status: 0, detail: String(error) };
}

export function isProblem(value: unknown): value is Problem {
  const v = value as Partial<Problem> | null;
  return !!v && typeof v === 'object' && typeof v.title === 'string' && typeof v.status === 'number' && typeof v.type === 'string';
}

/** Find the form control a '#/a/b' pointer names, if there is one. */
export function controlFor(form: FormGroup, pointer: string): AbstractControl | null {
  const path = pointer.replace(/^#\//, '').split('/').map((p) => p.replace(/~1/g, '/').replace(/~0/g, '~'));
  return form.get(path);
}

/**
 * Put each field problem on its control as a `server` error. Returns the problems that
 * matched no control, for the caller to show elsewhere.
 */
export function applyProblemToForm(form: FormGroup, problem: Problem): { pointer: string; detail: string }[] {
  const unmatched: { pointer: string; detail: string }[] = [];
  for (const e of problem.errors ?? []) {
    const control = controlFor(form, e.pointer);
    if (control) {
      control.setErrors({ ...(control.errors ?? {}), server: e.detail });
      control.markAsTouched();
    } else {
      unmatched.push(e);
    }
  }
  return unmatched;
}
