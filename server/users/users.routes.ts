import { IdParam } from '../http/params';
import { CreateUserSchema, ListQuerySchema, UpdateUserSchema } from '../../shared/schemas/users';
import { currentUser } from '../auth/guards';
import { ApiRouter, handle } from '../http/api-router';
import * as users from './users.service';


export function userRoutes() {
  const r = new ApiRouter('/api/users');
  r.get('/', 'users:manage', handle((req) => users.listUsers(ListQuerySchema.parse(req.query))));
  r.post(
    '/',
    'users:manage',
    handle(async (req, res) => {
      res.status(201);
      return users.createUser(CreateUserSchema.parse(req.body));
    }),
  );
  r.patch(
    '/:id',
    'users:manage',
    handle((req) => users.updateUser(IdParam.parse(req.params).id, UpdateUserSchema.parse(req.body), currentUser(req).id)),
  );
  r.post('/:id/reset-password', 'users:manage', handle((req) => users.resetPassword(IdParam.parse(req.params).id)));
  r.get('/assignable', 'tickets:manage', handle(() => users.assignableTechnicians()));
  return r;
}
