import { currentUser } from '../auth/guards';
import type { AppContext } from '../context';
import { ApiRouter, handle } from '../http/api-router';
import { IdParam } from '../http/params';
import { latestReanalysis, startCableReanalysis } from './cable-reanalysis';

/** Re-analysis of every current trace of a cable type, started from the cable page and followed there. */
export function cableReanalysisRoutes(ctx: AppContext) {
  const r = new ApiRouter('/api/cables');
  r.post(
    '/:id/reanalyses',
    'cables:write',
    handle(async (req, res) => {
      res.status(202);
      return startCableReanalysis(ctx, IdParam.parse(req.params).id, currentUser(req).id);
    }),
  );
  r.get(
    '/:id/reanalyses/latest',
    'cables:read',
    handle(async (req) => ({ reanalysis: await latestReanalysis(IdParam.parse(req.params).id) })),
  );
  return r;
}
