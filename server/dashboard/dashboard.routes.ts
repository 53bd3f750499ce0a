import { ApiRouter, handle } from '../http/api-router';
import { dashboard } from './dashboard.service';

export function dashboardRoutes() {
  const r = new ApiRouter('/api/dashboard');
  r.get('/', 'dashboard:read', handle(() => dashboard()));
  return r;
}
