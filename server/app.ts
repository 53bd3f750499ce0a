import fs from 'node:fs';
import path from 'node:path';
import express, { type Express } from 'express';
import cookieParser from 'cookie-parser';
import helmet from 'helmet';
import type { DestinationStream } from 'pino';
import { authRoutes } from './auth/auth.routes';
import { cableRoutes } from './cables/cables.routes';
import { calibrationRoutes } from './calibrations/calibrations.routes';
import { createCsrf } from './auth/csrf';
import { configurePassport } from './auth/passport';
import { configurePasswordHashing } from './auth/passwords';
import { createSessionMiddleware, sessionLifetime } from './auth/session';
import type { AppConfig } from './config';
import type { AppContext } from './context';
import { connect } from './db/connection';
import { seedDemo } from './db/demo/seed';
import { migrate } from './db/migrations';
import { initModels } from './db/models';
import { startJobs } from './jobs';
import { registerCableReanalysis } from './jobs/cable-reanalysis';
import { registerTraceAnalysis } from './traces/background-analysis';
import { cableReanalysisRoutes } from './jobs/cable-reanalysis.routes';
import { startMail } from './mail';
import { openStorage } from './storage';
import { sessionSecret } from './db/settings';
import { AppError, errorHandler } from './errors';
import type { ApiRouter, RouteRecord } from './http/api-router';
import { refuseEncodedForms, refuseNulBytes, refuseRepeatedFields, refuseUnreadBodies } from './http/strict-input';
import { staticClient } from './static-client';
import { outboxRoutes } from './outbox/outbox.routes';
import { dashboardRoutes } from './dashboard/dashboard.routes';
import { ticketRoutes } from './tickets/tickets.routes';
import { cableRunRoutes } from './cable-runs/cable-runs.routes';
import { findingRoutes } from './findings/findings.routes';
import { measurementRoutes } from './measurements/measurements.routes';
import { siteRoutes } from './sites/sites.routes';
import { sampleTraceRoutes } from './traces/sample-traces.routes';
import { traceRoutes } from './traces/traces.routes';
import { traceOutcomeRoutes } from './trace-outcomes/trace-outcomes.routes';
import { sweepInboxWhileRunning, sweepUploads } from './traces/traces.service';
import { userRoutes } from './users/users.routes';
import { createLogger, requestIds, securityLog } from './log';
import { healthRoutes } from './health/health';
import { hardenFiles } from './startup';

export interface RhologApp {
  app: Express;
  ctx: AppContext;
  routes: RouteRecord[];
  close: () => Promise<void>;
  /** From now on /api/ready answers 503, so the proxy sends new requests to the other instances. */
  beginShutdown: () => void;
}

/** The whole Express app on a migrated database; listen() is the caller's business. */
export async function createApp(config: AppConfig, options: { logDestination?: DestinationStream } = {}): Promise<RhologApp> {
  const logger = createLogger(config, options.logDestination);
  const log = (message: string, extra?: unknown) => logger.info(extra === undefined ? {} : { extra }, message);
  configurePasswordHashing({ cost: config.scryptCost });
  const sequelize = await connect(config.databaseUrl, { sqliteBusyTimeoutMs: config.sqliteBusyTimeoutMs });
  initModels(sequelize);
  await migrate(sequelize);
  const mail = await startMail(config, log);
  const jobs = await startJobs(config, log);
  const storage = openStorage(config);
  const ctx: AppContext = { config, sequelize, onClose: [], log, logger, security: securityLog(logger), mail, jobs, storage };
  if (storage.close) ctx.onClose.push(storage.close.bind(storage));
  ctx.onClose.push(() => sequelize.close());
  ctx.onClose.unshift(() => mail.close());
  fs.mkdirSync(config.uploadDir, { recursive: true, mode: 0o750 });
  hardenFiles(config, logger);
  await sweepUploads(ctx);
  ctx.onClose.unshift(sweepInboxWhileRunning(ctx));

  if (config.demoData) await seedDemo(ctx);
  await registerCableReanalysis(ctx);
  await registerTraceAnalysis(ctx);

  const lifecycle = { stopping: false };
  const app = express();
  app.disable('x-powered-by');
  app.use(requestIds);
  // A hop count, never `true`: the client address is the one the nearest trusted proxy saw, so a
  // visitor cannot choose theirs by sending X-Forwarded-For.
  app.set('trust proxy', config.trustProxyHops);
  app.use(
    helmet({
      // Strict-Transport-Security only on answers that went over HTTPS (below).
      strictTransportSecurity: false,
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
  app.use((req, res, next) => {
    if (req.secure) res.setHeader('Strict-Transport-Security', 'max-age=31536000; includeSubDomains');
    next();
  });
  app.use(express.json({ limit: '256kb' }));
  app.use(express.urlencoded({ extended: false, limit: '64kb' }));
  app.use('/api', refuseNulBytes);
  app.use('/api', refuseRepeatedFields);
  app.use('/api', refuseEncodedForms);
  app.use('/api', refuseUnreadBodies);

  const secret = await sessionSecret(sequelize, config.sessionSecret);
  const sessions = createSessionMiddleware(config, sequelize, secret);
  ctx.onClose.unshift(sessions.stop);
  app.use(cookieParser());
  app.use(sessions.middleware);
  app.use(sessionLifetime(config, ctx.security));
  const passport = configurePassport();
  app.use(passport.initialize());
  app.use(passport.session());

  // API answers are per person and change often: never kept by a browser or a proxy.
  app.use('/api', (_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store');
    next();
  });
  const csrf = createCsrf({ sessionSecret: secret, cookieSecure: config.cookieSecure });
  app.use('/api', csrf.protection);

  const healthRouteList = healthRoutes(app, ctx, lifecycle);

  const routers: ApiRouter[] = [authRoutes(ctx, { passport, csrf }), userRoutes(ctx), cableRoutes(), cableReanalysisRoutes(ctx), calibrationRoutes(ctx), outboxRoutes(ctx), siteRoutes(ctx), cableRunRoutes(ctx), traceOutcomeRoutes(ctx), traceRoutes(ctx), sampleTraceRoutes(ctx), findingRoutes(ctx), measurementRoutes(ctx), ticketRoutes(ctx), dashboardRoutes()];
  for (const r of routers) app.use(r.prefix, r.router);
  const routes = [...healthRouteList, ...routers.flatMap((r) => r.routes)];

  app.use('/api', (req, _res, next) => {
    next(new AppError(404, 'no_such_route', `There is no API route ${req.method} ${req.originalUrl}.`));
  });

  if (config.client === 'static') {
    const dist = path.resolve('dist/client');
    if (!fs.existsSync(path.join(dist, 'index.html'))) {
      throw new Error(`The built client is missing (${dist}/index.html). Run "npm run build" first.`);
    }
    // Source maps are not built (vite.config.ts); any left over from an older build are not served.
    app.use((req, _res, next) => next(req.path.endsWith('.map') ? new AppError(404, 'not_found', 'Not found.') : undefined));
    app.use(staticClient(dist));
  } else if (config.client === 'vite') {
    const { createServer } = await import('vite');
    const vite = await createServer({ server: { middlewareMode: true }, appType: 'spa' });
    ctx.onClose.unshift(() => vite.close());
    app.use(vite.middlewares);
  }

  // Stack traces and file paths only for a developer (NODE_ENV=development); the log always has them.
  app.use(errorHandler({ exposeInternals: config.env === 'development', log: (err) => logger.error({ err }, 'request failed') }));

  const close = async () => {
    lifecycle.stopping = true;
    // Running jobs first: they finish, or are handed back to the queue, while the database and the analysis pool are still there.
    await jobs.stop(config.jobs.shutdownGraceMs);
    for (const fn of ctx.onClose) await fn();
  };
  return { app, ctx, routes, close, beginShutdown: () => void (lifecycle.stopping = true) };
}
