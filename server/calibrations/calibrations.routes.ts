import { IdParam } from '../http/params';
import {
  CalibrationAcceptSchema,
  CalibrationFileSchema,
  CalibrationListQuerySchema,
  CalibrationRejectSchema,
} from '../../shared/schemas/cables';
import { currentUser } from '../auth/guards';
import type { AppContext } from '../context';
import { ApiRouter, handle } from '../http/api-router';
import * as calibrations from './calibrations.service';

export function calibrationRoutes(ctx: AppContext) {
  const r = new ApiRouter('/api/calibrations');
  r.get('/', 'calibrations:review', handle((req) => calibrations.listCalibrations(CalibrationListQuerySchema.parse(req.query))));
  r.get(
    '/mine',
    'calibrations:submit',
    handle((req) =>
      calibrations.listCalibrations({ ...CalibrationListQuerySchema.parse({ status: 'all', ...req.query }), submittedById: currentUser(req).id }),
    ),
  );
  r.post(
    '/',
    'calibrations:submit',
    handle(async (req, res) => {
      const input = CalibrationFileSchema.parse(req.body);
      const created = await calibrations.submitCalibration({ ...input, submittedById: currentUser(req).id });
      res.status(201);
      return created;
    }),
  );
  r.post(
    '/:id/accept',
    'calibrations:review',
    handle((req) => {
      const { id } = IdParam.parse(req.params);
      return calibrations.acceptCalibration(id, currentUser(req), CalibrationAcceptSchema.parse(req.body ?? {}), ctx.security);
    }),
  );
  r.post(
    '/:id/reject',
    'calibrations:review',
    handle((req) => {
      const { id } = IdParam.parse(req.params);
      return calibrations.rejectCalibration(id, currentUser(req).id, CalibrationRejectSchema.parse(req.body ?? {}).reason);
    }),
  );
  return r;
}
