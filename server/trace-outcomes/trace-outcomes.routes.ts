import {
  ARCHIVED_LIST_PAGE_SIZE,
  ArchiveReasonSchema,
  ArchivedListQuerySchema,
  HealthyOutcomeSchema,
  SampleWindowQuerySchema,
  TraceCalibrationSchema,
} from '../../shared/schemas/trace-outcomes';
import { currentUser } from '../auth/guards';
import type { AppContext } from '../context';
import { ApiRouter, handle } from '../http/api-router';
import { IdParam } from '../http/params';
import { archiveTrace, archiveView, listArchived, restoreTrace } from './archive.service';
import { fileCalibration, recordHealthy, traceOutcomes } from './outcomes.service';
import { sampleWindow } from './samples.service';

/**
 * What a trace ended as besides a fault (a healthy far end, a calibration),
 * archiving junk, and zoomed windows of its samples. Mounted beside the
 * traces routes under the same prefix.
 */
export function traceOutcomeRoutes(ctx: AppContext) {
  const r = new ApiRouter('/api/traces');
  r.get('/archived', 'traces:restore', handle((req) => listArchived(ArchivedListQuerySchema.parse(req.query).page, ARCHIVED_LIST_PAGE_SIZE)));
  r.get('/:id/outcomes', 'traces:read', handle((req) => traceOutcomes(IdParam.parse(req.params).id)));
  r.get('/:id/samples', 'traces:read', handle((req) => sampleWindow(ctx, IdParam.parse(req.params).id, SampleWindowQuerySchema.parse(req.query))));
  r.post(
    '/:id/healthy',
    'findings:confirm',
    handle(async (req, res) => {
      const id = IdParam.parse(req.params).id;
      const outcome = await recordHealthy(id, HealthyOutcomeSchema.parse(req.body ?? {}), currentUser(req));
      res.status(201);
      return outcome;
    }),
  );
  r.post(
    '/:id/calibration',
    'calibrations:submit',
    handle(async (req, res) => {
      const id = IdParam.parse(req.params).id;
      const filed = await fileCalibration(ctx, id, TraceCalibrationSchema.parse(req.body ?? {}), currentUser(req));
      res.status(201);
      return filed;
    }),
  );
  r.get('/:id/archive', 'traces:read', handle((req) => archiveView(IdParam.parse(req.params).id)));
  r.post('/:id/archive', 'traces:upload', handle((req) => archiveTrace(IdParam.parse(req.params).id, ArchiveReasonSchema.parse(req.body ?? {}).reason, currentUser(req))));
  r.post('/:id/restore', 'traces:restore', handle((req) => restoreTrace(IdParam.parse(req.params).id, ArchiveReasonSchema.parse(req.body ?? {}).reason, currentUser(req))));
  return r;
}
