import { pino, type DestinationStream, type Logger } from 'pino';

/** pino to stdout (or a given stream); secrets are redacted wherever they might appear. */
export function createLogger(level: string, destination?: DestinationStream): Logger {
  return pino(
    {
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
    },
    destination,
  );
}
