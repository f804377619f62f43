import type { RequestHandler } from 'express';
import type { z } from 'zod';
import { AppError, pointerFor } from './errors';

interface Schemas {
  body?: z.ZodType;
  params?: z.ZodType;
  query?: z.ZodType;
}

/** Parsed, typed request input; validate() puts it here (req.query is read-only in Express 5). */
export interface Valid {
  body?: unknown;
  params?: unknown;
  query?: unknown;
}

/**
 * Validate body, params and query with zod. Failures become one 400 problem whose errors[]
 * point at each field ('#/email' for the body; '#/params/id' and '#/query/page' for the others).
 */
export function validate(schemas: Schemas): RequestHandler {
  return (req, res, next) => {
    const valid: Valid = {};
    const errors: { pointer: string; detail: string }[] = [];
    for (const part of ['body', 'params', 'query'] as const) {
      const schema = schemas[part];
      if (!schema) continue;
      const result = schema.safeParse(req[part] ?? {});
      if (result.success) {
        valid[part] = result.data;
      } else {
        for (const issue of result.error.issues) {
          const path = part === 'body' ? issue.path : [part, ...issue.path];
          errors.push({ pointer: pointerFor(path), detail: issue.message });
        }
      }
    }
    if (errors.length) {
      throw AppError.badRequest('Some fields need correcting.', errors);
    }
    res.locals['valid'] = valid;
    next();
  };
}

/** Read what validate() stored, typed by the caller's schema. */
export function validated<T>(res: { locals: Record<string, unknown> }, part: keyof Valid): T {
  return (res.locals['valid'] as Valid)[part] as T;
}
