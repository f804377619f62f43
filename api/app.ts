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
import { apiNotFound, problemHandler } from './lib/problem-handler';
import { authRouter } from './modules/auth/router';
import { AuthService } from './modules/auth/service';
import { TokenService } from './modules/auth/tokens';
import { healthRouter } from './modules/health/router';
import { machinesRouter } from './modules/machines/router';
import { peopleRouter } from './modules/people/router';
import { photosRouter } from './modules/photos/router';
import { proceduresRouter } from './modules/procedures/router';
import { recordsRouter } from './modules/records/router';
import { RecordService } from './modules/records/service';
import { signOffQueueRouter, signOffRouter } from './modules/signoff/router';
import { SignOffService } from './modules/signoff/service';
import { PhotoService } from './modules/photos/service';

export interface AppDeps {
  config: Config;
  sequelize: Sequelize;
  logger?: Logger;
  /** The photo store; made from config when not given. */
  objectStore?: ObjectStore;
}

/** Build the Express app (no listen): the API under /api and, when built, the client app. */
export function createApp({
  config,
  sequelize,
  logger = createLogger(config.LOG_LEVEL),
  objectStore = new ObjectStore(config),
}: AppDeps): Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('query parser', 'simple');
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

  const api = Router();
  api.use(express.json({ limit: '1mb' }));
  api.use(cookieParser());
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  api.use('/health', healthRouter(sequelize));
  api.use('/auth', authRouter(auth, config));
  // Every other router needs a valid access token; each route also declares the roles it allows.
  const signedIn = requireSignIn(passport);
  api.use('/people', signedIn, peopleRouter());
  api.use('/machines', signedIn, machinesRouter());
  api.use('/photos', signedIn, photosRouter(photos, config));
  api.use('/procedures', signedIn, proceduresRouter());
  const records = new RecordService(sequelize, auth);
  const signOff = new SignOffService(sequelize, auth);
  records.useSignOff(signOff);
  api.use('/records', signedIn, recordsRouter(records, config));
  api.use('/records', signedIn, signOffRouter(signOff, records));
  api.use('/sign-off', signedIn, signOffQueueRouter(signOff));
  api.use(apiNotFound);
  app.use('/api', api);

  const staticDir = config.STATIC_DIR ? resolve(config.STATIC_DIR) : undefined;
  if (staticDir && existsSync(join(staticDir, 'index.html'))) {
    app.use(express.static(staticDir, { index: false, maxAge: '1y', immutable: true }));
    app.use((req, res, next) => {
      if (req.method !== 'GET' && req.method !== 'HEAD') return next();
      res.set('Cache-Control', 'no-cache').sendFile(join(staticDir, 'index.html'));
    });
  }

  app.use(problemHandler(logger));
  return app;
}
