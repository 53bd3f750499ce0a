import {
  MeasurementCorrectionSchema,
  MeasurementInputSchema,
  MeasurementListQuerySchema,
  MeasurementWithdrawSchema,
} from '../../shared/schemas/measurements';
import { currentUser } from '../auth/guards';
import type { AppContext } from '../context';
import { ApiRouter, handle } from '../http/api-router';
import { once } from '../http/idempotency';
import { IdParam } from '../http/params';
import * as measurements from './measurements.service';

export function measurementRoutes(ctx: AppContext) {
  const r = new ApiRouter('/api/measurements');
  r.get(
    '/',
    'findings:read',
    handle((req) => measurements.listMeasurements(MeasurementListQuerySchema.parse(req.query))),
  );
  r.post(
    '/',
    'measurements:record',
    handle((req, res) => {
      const input = MeasurementInputSchema.parse(req.body);
      return once(req, res, {
        logger: ctx.logger,
        userId: currentUser(req).id,
        status: 201,
        make: (receipt) => measurements.recordMeasurement(ctx, input, currentUser(req), receipt),
        replay: (id) => measurements.measurementView(id),
      });
    }),
  );
  r.get(
    '/:id',
    'findings:read',
    handle((req) => measurements.getMeasurement(IdParam.parse(req.params).id)),
  );
  r.post(
    '/:id/corrections',
    'measurements:record',
    handle(async (req, res) => {
      const id = IdParam.parse(req.params).id;
      const result = await measurements.correctMeasurement(
        ctx,
        id,
        MeasurementCorrectionSchema.parse(req.body),
        currentUser(req),
      );
      res.status(201);
      return result;
    }),
  );
  r.post(
    '/:id/withdraw',
    'measurements:record',
    handle((req) =>
      measurements.withdrawMeasurement(
        ctx,
        IdParam.parse(req.params).id,
        MeasurementWithdrawSchema.parse(req.body),
        currentUser(req),
      ),
    ),
  );
  return r;
}
