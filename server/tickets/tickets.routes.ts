import type { Request, Response } from 'express';
import { IdParam } from '../http/params';
import {
  CloseoutSchema,
  TicketCommentSchema,
  TicketCreateSchema,
  TicketListQuerySchema,
  TicketMoveSchema,
  TicketUpdateSchema,
  type TicketDetail,
} from '../../shared/schemas/tickets';
import { currentUser } from '../auth/guards';
import type { AppContext } from '../context';
import { ApiRouter, handle } from '../http/api-router';
import { once, type WriteReceipt } from '../http/idempotency';
import * as tickets from './tickets.service';

export function ticketRoutes(ctx: AppContext) {
  const r = new ApiRouter('/api/tickets');
  /**
   * A change to a ticket that is safe to send twice: with an Idempotency-Key it is made once, and a repeat whose
   * answer was lost is answered (200) with the ticket as it is now, as the first try was.
   */
  const onceOnTicket = (req: Request, res: Response, make: (receipt: WriteReceipt | undefined) => Promise<TicketDetail>) =>
    once(req, res, {
      logger: ctx.logger,
      userId: currentUser(req).id,
      status: 200,
      make,
      replay: (ticketId) => tickets.getTicket(ticketId, currentUser(req)),
    });
  r.get('/', 'tickets:read', handle((req) => tickets.listTickets(currentUser(req), TicketListQuerySchema.parse(req.query))));
  r.get('/unticketed-findings', 'tickets:manage', handle(() => tickets.unticketedFindings()));
  r.post(
    '/',
    'tickets:manage',
    handle(async (req, res) => {
      const ticket = await tickets.createTicket(ctx, currentUser(req), TicketCreateSchema.parse(req.body));
      res.status(201);
      return ticket;
    }),
  );
  r.get('/:id', 'tickets:read', handle((req) => tickets.getTicket(IdParam.parse(req.params).id, currentUser(req))));
  r.patch(
    '/:id',
    'tickets:manage',
    handle((req, res) => {
      const id = IdParam.parse(req.params).id;
      const input = TicketUpdateSchema.parse(req.body);
      // An edit sent again whose answer was lost: its comment is recorded and mailed once, as through /comments.
      return onceOnTicket(req, res, (receipt) => tickets.updateTicket(ctx, currentUser(req), id, input, receipt));
    }),
  );
  r.post(
    '/:id/status',
    'tickets:work',
    handle((req) => tickets.moveTicket(ctx, currentUser(req), IdParam.parse(req.params).id, TicketMoveSchema.parse(req.body))),
  );
  r.post(
    '/:id/comments',
    'tickets:work',
    handle((req, res) => {
      const id = IdParam.parse(req.params).id;
      const { comment } = TicketCommentSchema.parse(req.body);
      // A comment sent again from a phone whose answer was lost is recorded and mailed once.
      return onceOnTicket(req, res, (receipt) => tickets.commentOnTicket(ctx, currentUser(req), id, comment, receipt));
    }),
  );
  r.post(
    '/:id/closeout',
    'tickets:work',
    handle((req, res) => {
      const id = IdParam.parse(req.params).id;
      const input = CloseoutSchema.parse(req.body);
      return onceOnTicket(req, res, (receipt) => tickets.closeOutTicket(ctx, currentUser(req), id, input, receipt));
    }),
  );
  return r;
}
