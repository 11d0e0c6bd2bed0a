import { existsSync } from 'node:fs';
import path from 'node:path';
import connectPgSimple from 'connect-pg-simple';
import express, { type Express } from 'express';
import session from 'express-session';
import helmet from 'helmet';
import pg from 'pg';
import { configurePassport } from './auth/passport.ts';
import type { AppConfig } from './config/env.ts';
import { fromRoot } from './config/paths.ts';
import type { Mailer } from './mail/mailer.ts';
import { errorHandler } from './middleware/error-handler.ts';
import { originCheck } from './middleware/origin-check.ts';
import { apiRouter } from './routes/index.ts';

/** What the app is built from; tests pass their own. */
export interface AppDeps {
  config: AppConfig;
  mailer: Mailer;
}

export interface LamellaApp {
  app: Express;
  /** Releases the session store's database pool. */
  close(): Promise<void>;
}

const clientDir = fromRoot('dist/client');
const SESSION_DAYS = 7;

/** Builds the Express app without listening (supertest imports this). */
export function createApp(deps: AppDeps): LamellaApp {
  const { config } = deps;
  const app = express();
  app.set('trust proxy', config.trustProxy);
  app.disable('x-powered-by');
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'"],
          connectSrc: ["'self'"],
          objectSrc: ["'none'"],
          frameAncestors: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
        },
      },
    }),
  );

  const pool = new pg.Pool({ connectionString: config.databaseUrl, max: 5 });
  const PgStore = connectPgSimple(session);
  app.use(
    session({
      name: 'lamella.sid',
      store: new PgStore({
        pool,
        tableName: 'session',
        createTableIfMissing: false,
      }),
      secret: config.sessionSecret,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      cookie: {
        httpOnly: true,
        sameSite: 'lax',
        secure: config.cookieSecure,
        maxAge: SESSION_DAYS * 24 * 3600 * 1000,
      },
    }),
  );
  const passport = configurePassport();
  app.use(passport.session());

  app.use(
    '/api',
    originCheck(config.publicUrl),
    express.json({ limit: '1mb' }),
    apiRouter(deps),
  );

  if (existsSync(clientDir)) {
    app.use(
      '/assets',
      express.static(path.join(clientDir, 'assets'), {
        immutable: true,
        maxAge: '1y',
      }),
    );
    app.use(express.static(clientDir, { index: false }));
    app.get('/{*splat}', (_req, res) => {
      res.sendFile(path.join(clientDir, 'index.html'));
    });
  }
  app.use(errorHandler);

  return { app, close: () => pool.end() };
}
