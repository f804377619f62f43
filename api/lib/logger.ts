import { pino, type Logger } from 'pino';

/** pino to stdout; secrets are redacted wherever they might appear. */
export function createLogger(level: string): Logger {
  return pino({
    level,
    redact: {
      paths: [
        'req.headers.authorization',
        'req.headers.cookie',
        'res.headers["set-cookie"]',
        'password',
        '*.password',
        'passwordHash',
        '*.passwordHash',
      ],
      censor: '[hidden]',
    },
  });
}
