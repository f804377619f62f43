import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import cookieParser from 'cookie-parser';
import express, { Router, type Express } from 'express';
import helmet from 'helmet';
import type { Logger } from 'pino';
import { pinoHttp } from 'pino-http';
import type { Sequelize } from 'sequelize';
import type { Config } from './config';
import { createPassport, requireSignIn } from './lib/access';
import { createLogger } from './lib/logger';
import { ObjectStore } from './lib/object-store';
import { postgresThrottleStores } from './lib/throttle-store';
import { apiNotFound, problemHandler } from './lib/problem-handler';
import { authRouter } from './modules/auth/router';
import { AuthService } from './modules/auth/service';
import { TokenService } from './modules/auth/tokens';
import { healthRouter } from './modules/health/router';
import { machinesRouter } from './modules/machines/router';
import { MachineService } from './modules/machines/service';
import { schedulesRouter } from './modules/schedules/router';
import { MachineStatusService } from './modules/schedules/service';
import type { TagOutNotifier } from './modules/schedules/tag-out-notice';
import { peopleRouter } from './modules/people/router';
import { PeopleService } from './modules/people/service';
import { setPasswordRouter } from './modules/people/set-password-router';
import { devMailRouter } from './modules/mail/dev-router';
import { Notifier } from './modules/mail/notifier';
import { Outbox } from './modules/mail/outbox';
import { photosRouter } from './modules/photos/router';
import { proceduresRouter } from './modules/procedures/router';
import { recordsRouter } from './modules/records/router';
import { RecordService } from './modules/records/service';
import { signOffQueueRouter, signOffRouter } from './modules/signoff/router';
import { SignOffService } from './modules/signoff/service';
import { PhotoService } from './modules/photos/service';
import { archiveRouter } from './modules/archive/router';
import { ArchiveService } from './modules/archive/service';
import { pdfRouter } from './modules/pdf/router';
import { PdfService } from './modules/pdf/service';
import { bladesRouter } from './modules/blades/router';
import { BladeService, currentBlade } from './modules/blades/service';
import { competenciesRouter } from './modules/competencies/router';
import { CompetencyService, listExpiringAuthorisations, workshopDate } from './modules/competencies/service';

export interface AppDeps {
  config: Config;
  sequelize: Sequelize;
  logger?: Logger;
  /** The photo store; made from config when not given. */
  objectStore?: ObjectStore;
  /** The clock that due dates and expiries are judged by (tests fix it). */
  now?: () => Date;
  /** Who hears of a tag-out; by default the workshop admins, by e-mail. */
  notifyTaggedOut?: TagOutNotifier;
  /** The e-mail outbox; made from config when not given. It only queues until its worker is started (main.ts does). */
  outbox?: Outbox;
  /**
   * Put before every throttle key in the shared counter table: '' (the default) in production, so
   * every instance counts the same tries; tests give each app its own so their tries do not add up.
   */
  throttleNamespace?: string;
}

/** Build the Express app (no listen): the API under /api and, when built, the client app. */
export function createApp({
  config,
  sequelize,
  logger = createLogger(config.LOG_LEVEL),
  objectStore = new ObjectStore(config),
  now = () => new Date(),
  notifyTaggedOut,
  outbox = new Outbox(sequelize, config, logger),
  throttleNamespace = '',
}: AppDeps): Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('query parser', 'simple');
  // Behind a load balancer the client's address comes from X-Forwarded-For, for the hops configured.
  if (config.TRUST_PROXY !== undefined) app.set('trust proxy', config.TRUST_PROXY);
  const https = config.COOKIE_SECURE ? config.COOKIE_SECURE === 'true' : config.NODE_ENV === 'production';
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          'img-src': ["'self'", 'data:', 'blob:'],
          'connect-src': ["'self'"],
          // Only ask browsers to upgrade to https when we are served over https.
          'upgrade-insecure-requests': https ? [] : null,
        },
      },
      strictTransportSecurity: https,
    }),
  );
  app.use(
    pinoHttp({
      logger,
      autoLogging: config.NODE_ENV !== 'test',
      serializers: {
        req: (req: { method: string; url: string }) => ({ method: req.method, url: req.url.split('?')[0] }),
        res: (res: { statusCode: number }) => ({ status: res.statusCode }),
      },
    }),
  );

  const tokens = new TokenService(config);
  const auth = new AuthService(tokens, config.REFRESH_TOKEN_HOURS, config.BCRYPT_COST);
  const passport = createPassport(tokens);
  const photos = new PhotoService(objectStore, config.PHOTO_MAX_PIXELS, logger);
  // Sign-in, witness and set-password throttles count in PostgreSQL, shared by every API instance.
  const throttles = postgresThrottleStores(sequelize, throttleNamespace);

  const api = Router();
  api.use(express.json({ limit: '1mb' }));
  api.use(cookieParser());
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  api.use('/health', healthRouter(sequelize));
  api.use('/auth', authRouter(auth, config, throttles));
  // E-mail: every notice goes through the outbox; other modules get `notifier` (see mail/notifier.ts).
  const notifier = new Notifier(outbox, config, logger);
  const people = new PeopleService(sequelize, notifier, { invitationHours: config.INVITATION_HOURS, bcryptCost: config.BCRYPT_COST });
  api.use('/auth', setPasswordRouter(people, config, throttles));
  // Every other router needs a valid access token; each route also declares the roles it allows.
  const signedIn = requireSignIn(passport);
  api.use('/people', signedIn, peopleRouter(people));
  if (config.NODE_ENV !== 'production' && config.MAIL_STAND_IN_DIR) api.use('/dev/mail', signedIn, devMailRouter(config.MAIL_STAND_IN_DIR));
  // Machine status, due dates and tag-out are derived from signed records each time they are asked for.
  const machineStatus = new MachineStatusService(sequelize, {
    now,
    soonDays: config.SCHEDULE_SOON_DAYS,
    tagOutProcedures: config.TAG_OUT_PROCEDURES,
    timeZone: config.WORKSHOP_TIME_ZONE,
    notify: notifyTaggedOut ?? (async (notice) => void (await notifier.notifyTaggedOut(notice.machine, { id: notice.recordId }))),
    publicUrl: config.PUBLIC_URL ?? `http://${config.HOST}:${config.PORT}`,
  });
  const machines = new MachineService(sequelize, machineStatus);
  // The machine page shows the blade on the saw now, from the blades module.
  machines.useCurrentBlade(async (machineId) => {
    const fitting = await currentBlade(machineId);
    return fitting ? { id: fitting.id, label: fitting.bladeType.label, fittedAt: fitting.fittedAt } : null;
  });
  // The daily "due this week" e-mail lists what the register shows as overdue, due or due soon.
  notifier.useDueThisWeek(async () =>
    (await machineStatus.dueList()).items.map((i) => ({ machine: i.machine, procedureTitle: i.procedureTitle, dueOn: i.dueAt!, reason: i.reasons[0] })),
  );
  api.use('/machines', signedIn, machinesRouter(machines, photos, { publicUrl: config.PUBLIC_URL, workshopName: config.WORKSHOP_NAME }));
  api.use('/schedules', signedIn, schedulesRouter(machineStatus));
  api.use('/photos', signedIn, photosRouter(photos, config));
  api.use('/procedures', signedIn, proceduresRouter());
  const records = new RecordService(sequelize, auth);
  const signOff = new SignOffService(sequelize, auth);
  records.useSignOff(signOff);
  records.useNotifier(notifier);
  signOff.useNotifier(notifier);
  records.useStartCheck((machineId, procedureKey) => machineStatus.assertMayStart(machineId, procedureKey));
  signOff.whenSignedOff((id) => machineStatus.afterSignOff(id).catch((err) => logger.error({ err, record: id }, 'could not send the tag-out notice')));
  const pdfs = new PdfService(
    objectStore,
    { workshopName: config.WORKSHOP_NAME, timeZone: config.WORKSHOP_TIME_ZONE, publicUrl: config.PUBLIC_URL ?? `http://${config.HOST}:${config.PORT}` },
    logger,
  );
  signOff.whenSignedOff((id) => pdfs.afterSignOff(id));
  // A signed blade change records which blade went on the saw (its own failures are logged, never the signature's).
  const blades = new BladeService(sequelize, logger);
  signOff.whenSignedOff((id) => blades.recordFittingAfterSignOff(id));
  api.use('/blades', signedIn, bladesRouter(blades));
  const competencies = new CompetencyService(sequelize, auth, config.WORKSHOP_TIME_ZONE, now);
  // The daily job also reminds people whose authorisation ends in 30 or 7 days.
  notifier.useExpiringAuthorisations(async () =>
    (await listExpiringAuthorisations(sequelize, workshopDate(config.WORKSHOP_TIME_ZONE, now()))).map((a) => ({
      personId: a.person.id,
      procedureTitle: a.procedureTitle,
      expiresOn: a.expiresOn,
      daysLeft: a.daysLeft,
    })),
  );
  api.use('/competencies', signedIn, competenciesRouter(competencies, config.WORKSHOP_TIME_ZONE));
  api.use('/records', signedIn, recordsRouter(records, config, throttles));
  api.use('/records', signedIn, signOffRouter(signOff, records));
  api.use('/records', signedIn, pdfRouter(pdfs, records));
  api.use('/archive', signedIn, archiveRouter(new ArchiveService(sequelize, pdfs, config.WORKSHOP_NAME, logger)));
  api.use('/sign-off', signedIn, signOffQueueRouter(signOff));
  api.use(apiNotFound);
  app.use('/api', api);

  const staticDir = config.STATIC_DIR ? resolve(config.STATIC_DIR) : undefined;
  if (staticDir && existsSync(join(staticDir, 'index.html'))) {
    // Hashed bundles keep for a year; the page, the service worker's files and the manifest are checked each time.
    const unhashed = /(?:^|[\\/])(?:index\.html|ngsw\.json|ngsw-worker\.js|safety-worker\.js|worker-basic\.min\.js|manifest\.webmanifest)$/;
    const setHeaders = (res: { setHeader(name: string, value: string): unknown }, path: string) => {
      if (unhashed.test(path)) res.setHeader('Cache-Control', 'no-cache');
    };
    app.use(express.static(staticDir, { index: false, maxAge: '1y', immutable: true, setHeaders }));
    app.use((req, res, next) => {
      if (req.method !== 'GET' && req.method !== 'HEAD') return next();
      res.set('Cache-Control', 'no-cache').sendFile(join(staticDir, 'index.html'));
    });
  }

  app.use(problemHandler(logger));
  return app;
}
