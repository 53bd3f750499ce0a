import type { AppContext } from '../context';
import { IdParam } from '../http/params';
import {
  CableRunInputSchema,
  CableRunListQuerySchema,
  CableRunUpdateSchema,
  MarkersInputSchema,
} from '../../shared/schemas/sites';
import { ApiRouter, handle } from '../http/api-router';
import * as runs from './cable-runs.service';

export function cableRunRoutes(ctx: AppContext) {
  const r = new ApiRouter('/api/cable-runs');
  r.get('/', 'sites:read', handle((req) => runs.listRuns(CableRunListQuerySchema.parse(req.query))));
  r.get('/cable-type-choices', 'sites:read', handle(() => runs.cableTypeChoices()));
  r.get('/:id', 'sites:read', handle((req) => runs.getRun(IdParam.parse(req.params).id)));
  r.post(
    '/',
    'sites:write',
    handle(async (req, res) => {
      const run = await runs.createRun(CableRunInputSchema.parse(req.body), ctx.sequelize);
      res.status(201);
      return run;
    }),
  );
  r.put('/:id', 'sites:write', handle((req) => runs.updateRun(IdParam.parse(req.params).id, CableRunUpdateSchema.parse(req.body), ctx.sequelize)));
  r.put(
    '/:id/markers',
    'sites:write',
    handle((req) => runs.replaceMarkers(IdParam.parse(req.params).id, MarkersInputSchema.parse(req.body), ctx.sequelize)),
  );
  return r;
}
