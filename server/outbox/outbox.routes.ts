import { IdParam } from '../http/params';
import { MailQueueQuerySchema, OutboxQuerySchema } from '../../shared/schemas/outbox';
import type { AppContext } from '../context';
import { currentUser } from '../auth/guards';
import { AppError } from '../errors';
import { ApiRouter, handle } from '../http/api-router';
import * as outbox from './outbox.service';


export function outboxRoutes(ctx: AppContext) {
  const r = new ApiRouter('/api/outbox');
  r.get('/', 'outbox:read', handle((req) => outbox.listOutbox(OutboxQuerySchema.parse(req.query))));
  // The mail sent to the signed-in person only: what their own inbox got, readable while mail is captured locally.
  r.get('/mine', 'outbox:own', handle((req) => outbox.listOutbox(OutboxQuerySchema.parse(req.query), currentUser(req).email)));
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
      const { job, retried } = await ctx.mail.queue.retry(id);
      if (!job) throw AppError.notFound(`Mail job ${id}`);
      if (!retried) {
        const state = job.status === 'sent' ? 'was already sent' : job.status === 'sending' ? 'is being sent now' : 'is already waiting to be sent';
        throw new AppError(409, 'not_failed', `Mail job ${id} ${state}; nothing was changed.`);
      }
      return outbox.mailJobView(job);
    }),
  );
  return r;
}
