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
import { apiNotFound, problemHandler } from './lib/problem-handler';
import { authRouter } from './modules/auth/router';
import { AuthService } from './modules/auth/service';
import { TokenService } from './modules/auth/tokens';
import { healthRouter } from './modules/health/router';
import { machinesRouter } from './modules/machines/router';
import { peopleRouter } from './modules/people/router';

export interface AppDeps {
  config: Config;
  sequelize: Sequelize;
  logger?: Logger;
}

/** Build the Express app (no listen): the API under /api and, when built, the client app. */
export function createApp({ config, sequelize, logger = createLogger(config.LOG_LEVEL) }: AppDeps): Express {
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
