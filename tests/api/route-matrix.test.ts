import type { Express } from 'express';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { can, ROLES, type Permission } from '../../shared/auth/permissions';
import { startApi, type Client, type TestApi } from './support/api';

let api: TestApi;
let clients: Record<string, Client>;

beforeAll(async () => {
  api = await startApi();
  clients = { anonymous: await api.anonymous() };
  for (const role of ROLES) clients[role] = await api.as(role);
});
afterAll(() => api.close());

interface Layer {
  route?: { path: string; methods: Record<string, boolean> };
  handle?: { stack?: Layer[] };
}

/** Every route Express itself knows about, however it was added. */
function expressRouteCount(app: Express): number {
  const walk = (stack: Layer[]): number =>
    stack.reduce((n, layer) => n + (layer.route ? 1 : layer.handle?.stack ? walk(layer.handle.stack) : 0), 0);
  return walk((app as unknown as { router: { stack: Layer[] } }).router.stack);
}

function send(c: Client, method: string, url: string) {
  switch (method) {
    case 'get':
      return c.get(url);
    case 'delete':
      return c.delete(url);
    case 'post':
      return c.post(url, {});
    case 'put':
      return c.put(url, {});
    default:
      return c.patch(url, {});
  }
}

describe('the API route matrix', () => {
  it('has every Express route declared through the guarded router (none added around it)', () => {
    expect(api.app.routes.length).toBeGreaterThan(8);
    expect(expressRouteCount(api.app.app)).toBe(api.app.routes.length);
  });

  it('answers each route for each role as the permissions map says', async () => {
    const problems: string[] = [];
    for (const route of api.app.routes) {
      const url = route.path.replace(/:[A-Za-z]+/g, '999999');
      const isLogout = route.path === '/api/auth/logout';
      for (const who of ['anonymous', ...ROLES] as const) {
        // Signing out would end the shared client's session: use a fresh one.
        const c = isLogout ? (who === 'anonymous' ? await api.anonymous() : await api.as(who)) : clients[who];
        const res = await send(c, route.method, url);
        const label = `${route.method.toUpperCase()} ${route.path} as ${who} → ${res.status} ${res.body?.error?.code ?? ''}`;
        if (res.status >= 500) problems.push(`${label} (server error)`);
        if (route.access === 'public') {
          if (res.status === 401 || res.status === 403) problems.push(`${label} (public route refused)`);
          continue;
        }
        if (who === 'anonymous') {
          if (res.status !== 401) problems.push(`${label} (expected 401)`);
          continue;
        }
        const allowed = route.access === 'signed-in' || can(who, route.access as Permission);
        if (allowed && (res.status === 401 || res.status === 403)) problems.push(`${label} (expected allowed)`);
        if (!allowed && !(res.status === 403 && res.body.error.code === 'forbidden')) problems.push(`${label} (expected 403 forbidden)`);
      }
    }
    expect(problems).toEqual([]);
  });
});
