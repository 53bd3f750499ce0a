import fs from 'node:fs';
import path from 'node:path';
import express, { type Express } from 'express';
import session from 'express-session';
import connectSessionSequelize from 'connect-session-sequelize';
import helmet from 'helmet';
import { authRoutes } from './auth/auth.routes';
import { cableRoutes } from './cables/cables.routes';
import { calibrationRoutes } from './calibrations/calibrations.routes';
import { configurePassport } from './auth/passport';
import type { AppConfig } from './config';
import type { AppContext } from './context';
import { connect } from './db/connection';
import { seedDemo } from './db/demo/seed';
import { migrate } from './db/migrations';
import { initModels } from './db/models';
import { startMail } from './mail';
import { sessionSecret } from './db/settings';
import { AppError, errorHandler } from './errors';
import type { ApiRouter, RouteRecord } from './http/api-router';
import { createCsrf } from './http/csrf';
import { outboxRoutes } from './outbox/outbox.routes';
import { dashboardRoutes } from './dashboard/dashboard.routes';
import { subscribeFindingNotices } from './tickets/finding-notices';
import { ticketRoutes } from './tickets/tickets.routes';
import { cableRunRoutes } from './cable-runs/cable-runs.routes';
import { findingRoutes } from './findings/findings.routes';
import { siteRoutes } from './sites/sites.routes';
import { traceRoutes } from './traces/traces.routes';
import { userRoutes } from './users/users.routes';

const SessionStore = connectSessionSequelize(session.Store);
const SESSION_MAX_AGE_MS = 12 * 60 * 60 * 1000;

export interface RhologApp {
  app: Express;
  ctx: AppContext;
  routes: RouteRecord[];
  close: () => Promise<void>;
}

/** The whole Express app on a migrated database; listen() is the caller's business. */
export async function createApp(config: AppConfig): Promise<RhologApp> {
  const log = (message: string, extra?: unknown) => {
    if (config.env !== 'test') console.log(`[rholog] ${message}`, ...(extra === undefined ? [] : [extra]));
  };
  const sequelize = await connect(config.databaseUrl);
  initModels(sequelize);
  await migrate(sequelize);
  const mail = await startMail(config, log);
  const ctx: AppContext = { config, sequelize, onClose: [], log, mail };
  ctx.onClose.push(() => sequelize.close());
  ctx.onClose.unshift(() => mail.close());
  fs.mkdirSync(config.uploadDir, { recursive: true });

  if (config.demoData) await seedDemo(ctx);

  const app = express();
  app.disable('x-powered-by');
  if (config.trustProxy) app.set('trust proxy', 1);
  app.use(
    helmet({
      contentSecurityPolicy:
        config.client === 'vite'
          ? false
          : {
              directives: {
                defaultSrc: ["'self'"],
                imgSrc: ["'self'", 'data:', 'blob:'],
                styleSrc: ["'self'", "'unsafe-inline'"],
                fontSrc: ["'self'", 'data:'],
                connectSrc: ["'self'"],
                upgradeInsecureRequests: null,
              },
            },
    }),
  );
  app.use(express.json({ limit: '256kb' }));
  app.use(express.urlencoded({ extended: false, limit: '64kb' }));

  const store = new SessionStore({
    db: sequelize,
    table: 'Session',
    expiration: SESSION_MAX_AGE_MS,
    extendDefaultFields: (defaults: { data: string; expires: Date }, s: { passport?: { user?: number } }) => ({
      data: defaults.data,
      expires: defaults.expires,
      userId: s.passport?.user ?? null,
    }),
  });
  ctx.onClose.unshift(() => (store as unknown as { stopExpiringSessions: () => void }).stopExpiringSessions());

  app.use(
    session({
      name: 'rholog.sid',
      secret: await sessionSecret(sequelize, config.sessionSecret),
      store,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      proxy: config.trustProxy,
      cookie: {
        httpOnly: true,
        sameSite: 'lax',
        secure: config.cookieSecure,
        maxAge: SESSION_MAX_AGE_MS,
      },
    }),
  );
  const passport = configurePassport();
  app.use(passport.initialize());
  app.use(passport.session());

  const csrf = createCsrf();
  app.use('/api', csrf.csrfSynchronisedProtection);

  app.get('/api/health', (_req, res) => {
    res.json({ status: 'ok' });
  });

  const routers: ApiRouter[] = [authRoutes(ctx, { passport, csrf }), userRoutes(), cableRoutes(), calibrationRoutes(), outboxRoutes(ctx), siteRoutes(ctx), cableRunRoutes(ctx), traceRoutes(ctx), findingRoutes(ctx), ticketRoutes(ctx), dashboardRoutes()];
  subscribeFindingNotices(ctx);
  for (const r of routers) app.use(r.prefix, r.router);
  const routes = [{ method: 'get' as const, path: '/api/health', access: 'public' as const }, ...routers.flatMap((r) => r.routes)];

  app.use('/api', (req, _res, next) => {
    next(new AppError(404, 'no_such_route', `There is no API route ${req.method} ${req.originalUrl}.`));
  });

  if (config.client === 'static') {
    const dist = path.resolve('dist/client');
    if (!fs.existsSync(path.join(dist, 'index.html'))) {
      throw new Error(`The built client is missing (${dist}/index.html). Run "npm run build" first.`);
    }
    app.use(express.static(dist, { index: false, maxAge: '1h' }));
    app.get('/{*splat}', (_req, res) => {
      res.sendFile(path.join(dist, 'index.html'));
    });
  } else if (config.client === 'vite') {
    const { createServer } = await import('vite');
    const vite = await createServer({ server: { middlewareMode: true }, appType: 'spa' });
    ctx.onClose.unshift(() => vite.close());
    app.use(vite.middlewares);
  }

  app.use(errorHandler({ exposeInternals: config.env !== 'production', log: (err) => console.error('[rholog]', err) }));

  const close = async () => {
    for (const fn of ctx.onClose) await fn();
  };
  return { app, ctx, routes, close };
}
