import type { Express } from 'express';
import type { AppContext } from '../context';
import { pendingMigrations } from '../db/migrations';

type Check = 'ok' | string;

async function check(fn: () => Promise<unknown>): Promise<Check> {
  try {
    await fn();
    return 'ok';
  } catch (err) {
    return (err as Error)?.message?.slice(0, 200) || String(err);
  }
}

/**
 * For the reverse proxy and the orchestrator:
 * - GET /api/health — the process is up and answering (liveness); no dependency is checked.
 * - GET /api/ready — this instance can serve: the database answers, every migration has run,
 *   the raw trace store and the job queue are reachable, and the instance is not shutting down.
 *   503 with the failing checks otherwise, so the proxy sends requests elsewhere.
 */
export function healthRoutes(app: Express, ctx: AppContext, state: { stopping: boolean }) {
  app.get('/api/health', (_req, res) => {
    res.json({ status: 'ok' });
  });
  app.get('/api/ready', async (_req, res) => {
    const [database, migrations, storage, jobs] = await Promise.all([
      check(() => ctx.sequelize.query('SELECT 1')),
      check(async () => {
        const pending = await pendingMigrations(ctx.sequelize);
        if (pending.length) throw new Error(`${pending.length} migration${pending.length === 1 ? '' : 's'} not run yet: ${pending.join(', ')}`);
      }),
      check(() => ctx.storage.ping()),
      check(() => ctx.jobs.ping()),
    ]);
    const checks = { database, migrations, storage, jobs, shutdown: state.stopping ? 'this instance is shutting down' : 'ok' };
    const ready = Object.values(checks).every((c) => c === 'ok');
    res.status(ready ? 200 : 503).json({ status: ready ? 'ready' : 'not-ready', checks });
  });
  return [
    { method: 'get' as const, path: '/api/health', access: 'public' as const },
    { method: 'get' as const, path: '/api/ready', access: 'public' as const },
  ];
}
