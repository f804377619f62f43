import { z } from 'zod';
import { DEMO_WORKSHOP } from './db/seed';

/** Everything the API reads from its environment, parsed once at boot. */
const configSchema = z.object({
  NODE_ENV: z.enum(['development', 'test', 'production']).default('development'),
  HOST: z.string().default('127.0.0.1'),
  PORT: z.coerce.number().int().min(0).max(65535).default(4300),
  DATABASE_URL: z.url({ protocol: /^postgres(ql)?$/, error: 'DATABASE_URL must be a postgres:// address' }),
  DATABASE_POOL_MAX: z.coerce.number().int().min(1).max(100).default(10),
  JWT_SECRET: z.string().min(32, 'JWT_SECRET must be at least 32 characters'),
  JWT_ISSUER: z.string().default('setwright'),
  JWT_AUDIENCE: z.string().default('setwright-api'),
  ACCESS_TOKEN_SECONDS: z.coerce.number().int().min(30).max(3600).default(900),
  REFRESH_TOKEN_HOURS: z.coerce.number().int().min(1).max(24).default(12),
  BCRYPT_COST: z.coerce.number().int().min(12, 'BCRYPT_COST must be 12 or more').max(15).default(12),
  LOGIN_WINDOW_SECONDS: z.coerce.number().int().min(1).default(900),
  LOGIN_LIMIT_PER_ACCOUNT: z.coerce.number().int().min(1).default(8),
  LOGIN_LIMIT_PER_ADDRESS: z.coerce.number().int().min(1).default(40),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  STATIC_DIR: z.string().optional(),
  PUBLIC_URL: z.url().optional(),
  /** Procedures a tagged-out machine may still start (comma-separated keys), besides the one that failed and any its schedules allow. */
  TAG_OUT_PROCEDURES: z
    .string()
    .default('isolation-lockout')
    .transform((s) => s.split(',').map((k) => k.trim()).filter(Boolean)),
  /** Scheduled checks falling due within this many days show as "Due soon". */
  SCHEDULE_SOON_DAYS: z.coerce.number().int().min(0).max(90).default(7),
  /**
   * Behind a load balancer or reverse proxy: which X-Forwarded-For hops to believe, as Express's
   * "trust proxy" takes it ("true", a hop count such as "1", or addresses/subnets such as
   * "loopback, 10.0.0.0/8"). Unset, the peer address is the client (throttles per device need the real one).
   */
  TRUST_PROXY: z
    .string()
    .trim()
    .min(1)
    .optional()
    .transform((v) => (v === undefined ? undefined : v === 'true' ? true : v === 'false' ? false : /^\d+$/.test(v) ? Number(v) : v)),
  /** Mark the refresh cookie Secure; defaults to on in production. Off only for plain-http serving on loopback. */
  COOKIE_SECURE: z.enum(['true', 'false']).optional(),
  /** The S3-compatible object store for photos (the local stand-in, or a real one: only these settings change). */
  S3_ENDPOINT: z.url({ error: 'S3_ENDPOINT must be an http(s):// address' }).optional(),
  S3_BUCKET: z.string({ error: 'S3_BUCKET must name the bucket that holds photos' }).min(3, 'S3_BUCKET must name the bucket that holds photos'),
  S3_REGION: z.string().min(1).default('us-east-1'),
  /** Without these two the SDK's own credential chain is used (instance roles and the like). */
  S3_ACCESS_KEY_ID: z.string().min(1).optional(),
  S3_SECRET_ACCESS_KEY: z.string().min(1).optional(),
  /** Bucket in the path (the stand-in and most self-hosted stores need it). */
  S3_FORCE_PATH_STYLE: z.enum(['true', 'false']).default('true'),
  /** Largest photo file accepted, in bytes (20 MB). */
  PHOTO_MAX_BYTES: z.coerce.number().int().min(1024).max(200 * 1024 * 1024).default(20 * 1024 * 1024),
  /** Largest photo accepted, in pixels (50 megapixels): a guard against decompression bombs. */
  PHOTO_MAX_PIXELS: z.coerce.number().int().min(10_000).max(268_402_689).default(50_000_000),
  /** The workshop's name, printed at the head of every record PDF. */
  WORKSHOP_NAME: z.string().trim().min(1).max(120).default(DEMO_WORKSHOP),
  /** The IANA time zone in which PDFs and evidence packs print dates and times (always with the offset). */
  WORKSHOP_TIME_ZONE: z
    .string()
    .default('Europe/London')
    .refine((tz) => {
      try {
        new Intl.DateTimeFormat('en-GB', { timeZone: tz });
        return true;
      } catch {
        return false;
      }
    }, 'WORKSHOP_TIME_ZONE must be an IANA time zone such as Europe/London'),
  /** The SMTP relay that e-mail goes to (the local stand-in in development and tests; a real relay in production). */
  SMTP_HOST: z.string().min(1).default('127.0.0.1'),
  SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(54325),
  /** TLS from the first byte (port 465 relays). */
  SMTP_SECURE: z.enum(['true', 'false']).default('false'),
  /** Never upgrade with STARTTLS: only for the local stand-in on 127.0.0.1. */
  SMTP_IGNORE_TLS: z.enum(['true', 'false']).default('false'),
  SMTP_USER: z.string().min(1).optional(),
  SMTP_PASSWORD: z.string().min(1).optional(),
  MAIL_FROM: z.string().trim().min(3).max(200).default('Setwright <no-reply@setwright.invalid>'),
  /** The job queue that e-mail waits in (tests use one of their own). */
  MAIL_QUEUE: z.string().regex(/^[A-Za-z0-9_.-]{1,60}$/, 'MAIL_QUEUE is letters, digits, dots, dashes and underscores').default('mail'),
  /** How often the mail worker looks for queued e-mail, in seconds (0.5 at the least). */
  MAIL_POLL_SECONDS: z.coerce.number().min(0.5).max(300).default(5),
  /** Retries of an e-mail the relay refuses or cannot take, with doubling waits starting at MAIL_RETRY_DELAY_SECONDS. */
  MAIL_RETRY_LIMIT: z.coerce.number().int().min(0).max(30).default(12),
  MAIL_RETRY_DELAY_SECONDS: z.coerce.number().int().min(1).max(3600).default(30),
  /** When the daily "due this week" e-mail goes out (cron, in WORKSHOP_TIME_ZONE). */
  MAIL_DUE_CRON: z.string().min(9).default('0 6 * * *'),
  /** The folder where the local SMTP stand-in keeps what it receives; admins can read it in development. */
  MAIL_STAND_IN_DIR: z.string().min(1).optional(),
  /** How long an invitation link works. */
  INVITATION_HOURS: z.coerce.number().int().min(1).max(24 * 14).default(72),
}).refine((c) => !c.S3_ACCESS_KEY_ID === !c.S3_SECRET_ACCESS_KEY, {
  path: ['S3_SECRET_ACCESS_KEY'],
  message: 'S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY go together: set both or neither',
}).refine((c) => !c.SMTP_USER === !c.SMTP_PASSWORD, {
  path: ['SMTP_PASSWORD'],
  message: 'SMTP_USER and SMTP_PASSWORD go together: set both or neither',
});

export type Config = z.infer<typeof configSchema>;

/** Parse the environment; throws one readable message listing every bad setting. */
export function loadConfig(env: Record<string, string | undefined> = process.env): Config {
  const parsed = configSchema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.') || '(root)'}: ${i.message}`);
    throw new Error(`Setwright cannot start: its settings are not right.\n${lines.join('\n')}`);
  }
  return parsed.data;
}
