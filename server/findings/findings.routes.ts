import { FindingReverseSchema } from '../../shared/schemas/finding-decisions';
import { FindingInputSchema, FindingListQuerySchema, TwoEndedQuerySchema } from '../../shared/schemas/findings';
import { IdParam } from '../http/params';
import { currentUser } from '../auth/guards';
import type { AppContext } from '../context';
import { ApiRouter, handle } from '../http/api-router';
import { once } from '../http/idempotency';
import * as decisions from './decisions.service';
import { bestLocationFor } from './best-location';
import * as findings from './findings.service';

export function findingRoutes(ctx: AppContext) {
  const r = new ApiRouter('/api/findings');
  r.get('/', 'findings:read', handle((req) => findings.listFindings(FindingListQuerySchema.parse(req.query))));
  r.get('/two-ended', 'findings:read', handle((req) => findings.twoEnded(TwoEndedQuerySchema.parse(req.query))));
  r.post(
    '/',
    'findings:confirm',
    handle((req, res) => {
      const input = FindingInputSchema.parse(req.body);
      return once(req, res, {
        logger: ctx.logger,
        userId: currentUser(req).id,
        status: 201,
        make: (receipt) => findings.recordFinding(ctx, input, currentUser(req).id, receipt),
        replay: (id) => findings.getFinding(id),
      });
    }),
  );
  r.get(
    '/:id',
    'findings:read',
    handle(async (req) => {
      const id = IdParam.parse(req.params).id;
      return { ...(await findings.getFinding(id)), bestLocation: await bestLocationFor(id), tickets: await findings.ticketsFor(id) };
    }),
  );
  r.get('/:id/decisions', 'findings:read', handle((req) => decisions.decisionHistory(IdParam.parse(req.params).id)));
  r.post(
    '/:id/reverse',
    'findings:review',
    handle((req) => decisions.reverseDecision(ctx, IdParam.parse(req.params).id, FindingReverseSchema.parse(req.body), currentUser(req))),
  );
  r.get('/:id/two-ended', 'findings:read', handle(async (req) => ({ twoEnded: await findings.twoEndedFor(IdParam.parse(req.params).id) })));
  return r;
}
