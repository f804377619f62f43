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

/** Connection-level database failures (a restart, a lost connection): the request can be retried. */
export function databaseUnavailable(err: unknown): boolean {
  const e = err as { name?: string; original?: { code?: string }; parent?: { code?: string }; code?: string } | null;
  if (!e) return false;
  if (typeof e.name === 'string' && /^Sequelize(Connection\w*Error|HostNotReachableError|HostNotFoundError|InvalidConnectionError|ConnectionTimedOutError)$/.test(e.name)) return true;
  const message = (err as Error).message ?? '';
  // node-postgres reports a dropped connection only in its message.
  if (/Connection terminated|connection error and is not queryable|terminating connection|the database system is (starting up|shutting down)/i.test(message)) return true;
  const code = e.original?.code ?? e.parent?.code ?? e.code;
  // 57P01-03: the server is shutting down or starting; 08xxx: connection exceptions.
  return typeof code === 'string' && (/^57P0[123]$/.test(code) || /^08/.test(code) || code === 'ECONNREFUSED' || code === 'ECONNRESET');
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
    if (databaseUnavailable(err)) {
      logger.warn({ err }, 'database unavailable');
      res.set('Retry-After', '2');
      send(res, {
        type: problemType('database-unavailable'),
        title: 'The database is not answering',
        status: 503,
        detail: 'Nothing was saved by this request. Try again in a few seconds; your entries are still on the screen.',
        instance: req.originalUrl,
      });
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
