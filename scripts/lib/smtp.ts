import { randomBytes } from 'node:crypto';
import { createWriteStream, mkdirSync, renameSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { pipeline } from 'node:stream/promises';
import { SMTPServer } from 'smtp-server';

/** The address the stand-in's messages come from, in the invented demo workshop. */
export const STAND_IN_MAIL_FROM = 'Setwright at Brackenford <setwright@brackenford-works.example>';
const MAX_BYTES = 10 * 1024 * 1024;

export interface SmtpStandIn {
  port: number;
  directory: string;
  /** What the API reads to send to it (and, outside production, to show what it received). */
  env: Record<string, string>;
  stop(): Promise<void>;
}

/**
 * The local stand-in for the SMTP relay: smtp-server on 127.0.0.1, speaking real SMTP (no TLS, no
 * sign-in), keeping every message it accepts as one .eml file in `directory`. Files are named by
 * arrival time and written under a temporary name first, so a reader never sees half a message.
 */
export async function startSmtpStandIn(o: { directory: string; port: number; log?: (line: string) => void }): Promise<SmtpStandIn> {
  const log = o.log ?? (() => {});
  mkdirSync(o.directory, { recursive: true });
  let sequence = 0;
  const server = new SMTPServer({
    name: 'setwright-mail-stand-in',
    banner: 'Setwright SMTP stand-in: messages are stored as files, never delivered',
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    hideSTARTTLS: true,
    size: MAX_BYTES,
    closeTimeout: 3000,
    logger: false,
    onData(stream, _session, callback) {
      const name = `${new Date().toISOString().replace(/[:.]/g, '-')}-${String(++sequence).padStart(6, '0')}-${randomBytes(4).toString('hex')}`;
      const partial = join(o.directory, `.${name}.part`);
      pipeline(stream, createWriteStream(partial))
        .then(() => {
          if ((stream as { sizeExceeded?: boolean }).sizeExceeded) {
            rmSync(partial, { force: true });
            const err = Object.assign(new Error('Message is larger than the stand-in accepts'), { responseCode: 552 });
            return callback(err);
          }
          renameSync(partial, join(o.directory, `${name}.eml`));
          callback(null, `stored as ${name}.eml`);
        })
        .catch((err: Error) => {
          rmSync(partial, { force: true });
          callback(err);
        });
    },
  });
  await new Promise<void>((resolve, reject) => {
    const failed = (err: NodeJS.ErrnoException) => {
      reject(
        err.code === 'EADDRINUSE'
          ? new Error(`the SMTP stand-in cannot listen on 127.0.0.1:${o.port}: something else uses that port (set SETWRIGHT_SMTP_PORT to another one)`)
          : err,
      );
    };
    server.once('error', failed);
    server.listen(o.port, '127.0.0.1', () => {
      server.off('error', failed);
      resolve();
    });
  });
  server.on('error', (err) => log(`SMTP stand-in: ${err.message}`));
  log(`SMTP stand-in on 127.0.0.1:${o.port}, storing messages in ${o.directory}`);
  let stopped = false;
  return {
    port: o.port,
    directory: o.directory,
    env: {
      SMTP_HOST: '127.0.0.1',
      SMTP_PORT: String(o.port),
      SMTP_SECURE: 'false',
      SMTP_IGNORE_TLS: 'true',
      MAIL_FROM: STAND_IN_MAIL_FROM,
      MAIL_STAND_IN_DIR: o.directory,
    },
    async stop() {
      if (stopped) return;
      stopped = true;
      log('stopping the SMTP stand-in');
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}
