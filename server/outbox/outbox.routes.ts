import { IdParam } from '../http/params';
import { MailQueueQuerySchema, OutboxQuerySchema } from '../../shared/schemas/outbox';
import type { AppContext } from '../context';
import { AppError } from '../errors';
import { ApiRouter, handle } from '../http/api-router';
import * as outbox from './outbox.service';


export function outboxRoutes(ctx: AppContext) {
  const r = new ApiRouter('/api/outbox');
  r.get('/', 'outbox:read', handle((req) => outbox.listOutbox(OutboxQuerySchema.parse(req.query))));
  r.get(
    '/queue',
    'outbox:read',
    handle(async (req) => ({
      ...(await outbox.listMailJobs(MailQueueQuerySchema.parse(req.query))),
      relay: ctx.mail.mailer.describe,
    })),
  );
  r.post(
    '/queue/:id/retry',
    'outbox:read',
    handle(async (req) => {
      const id = IdParam.parse(req.params).id;
      const job = await ctx.mail.queue.retry(id);
      if (!job) throw AppError.notFound(`Mail job ${id}`);
      return outbox.mailJobView(job);
    }),
  );
  return r;
}
