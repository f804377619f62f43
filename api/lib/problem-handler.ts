import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { Logger } from 'pino';
import { AppError, problemType, type ProblemBody } from './errors';

export const PROBLEM_JSON = 'application/problem+json';

function send(res: Parameters<RequestHandler>[1], body: ProblemBody) {
  res.status(body.status).type(PROBLEM_JSON).json(body);
}

/** Unknown routes under /api: a 404 problem, never the client app's HTML. */
export const apiNotFound: RequestHandler = (req, res) => {
  send(res, {
    type: problemType('not-found'),
    title: 'Not found',
    status: 404,
    detail: `There is no ${req.method} ${req.originalUrl.split('?')[0]} in this API.`,
    instance: req.originalUrl,
  });
};

interface HttpishError {
  status?: number;
  statusCode?: number;
  type?: string;
  expose?: boolean;
}

/** The one error handler: AppErrors as they are, body-parser errors as 400/413, anything else as a bare 500. */
export function problemHandler(logger: Logger): ErrorRequestHandler {
  return (err, req, res, next) => {
    if (res.headersSent) {
      next(err);
      return;
    }
    if (err instanceof AppError) {
      const body: ProblemBody = {
        ...err.extensions,
        type: problemType(err.slug),
        title: err.title,
        status: err.status,
        detail: err.detail,
        instance: req.originalUrl,
      };
      if (err.errors?.length) body.errors = err.errors;
      if (err.status >= 500) logger.error({ err }, 'request failed');
      send(res, body);
      return;
    }
    const e = err as HttpishError;
    const status = e.status ?? e.statusCode;
    if (status && status >= 400 && status < 500 && e.expose !== false) {
      const tooLarge = status === 413;
      send(res, {
        type: problemType(tooLarge ? 'too-large' : 'unreadable-request'),
        title: tooLarge ? 'The request is too large' : 'The request could not be read',
        status,
        detail: tooLarge
          ? 'The request body is larger than this server accepts.'
          : 'The request body is not valid JSON or is not in a form this server reads.',
        instance: req.originalUrl,
      });
      return;
    }
    logger.error({ err }, 'unexpected error');
    send(res, {
      type: problemType('server-error'),
      title: 'Something went wrong on the server',
      status: 500,
      detail: 'The server could not finish this request. Try again, and tell the workshop admin if it keeps happening.',
      instance: req.originalUrl,
    });
  };
}
