import { IdParam } from '../http/params';
import { CreateUserSchema, HandOverSchema, ListQuerySchema, UpdateUserSchema } from '../../shared/schemas/users';
import { currentUser } from '../auth/guards';
import type { AppContext } from '../context';
import { ApiRouter, handle } from '../http/api-router';
import { handOverRepairs, openRepairsOf } from './hand-over.service';
import * as users from './users.service';

export function userRoutes(ctx: AppContext) {
  const r = new ApiRouter('/api/users');
  r.get('/', 'users:manage', handle((req) => users.listUsers(ListQuerySchema.parse(req.query))));
  r.post(
    '/',
    'users:manage',
    handle(async (req, res) => {
      const created = await users.createUser(ctx, CreateUserSchema.parse(req.body), currentUser(req).id);
      res.status(201);
      return created;
    }),
  );
  r.patch(
    '/:id',
    'users:manage',
    handle((req) => users.updateUser(ctx, IdParam.parse(req.params).id, UpdateUserSchema.parse(req.body), currentUser(req))),
  );
  r.post('/:id/reset-password', 'users:manage', handle((req) => users.resetPassword(ctx, IdParam.parse(req.params).id, currentUser(req).id)));
  r.get('/assignable', 'tickets:manage', handle(() => users.assignableTechnicians()));
  r.get('/:id/open-repairs', 'users:manage', handle((req) => openRepairsOf(IdParam.parse(req.params).id)));
  r.post(
    '/:id/hand-over-repairs',
    'users:manage',
    handle((req) => handOverRepairs(ctx, IdParam.parse(req.params).id, HandOverSchema.parse(req.body).toUserId, currentUser(req))),
  );
  return r;
}
