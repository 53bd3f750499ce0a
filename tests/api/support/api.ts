import type { AddressInfo, Socket } from 'node:net';
import type { DestinationStream } from 'pino';
import supertest from 'supertest';
import { createApp, type RhologApp } from '../../../server/app';
import type { AppConfig } from '../../../server/config';
import { hashPassword } from '../../../server/auth/passwords';
import { User } from '../../../server/db/models';
import type { Role } from '../../../shared/auth/permissions';
import { freshDatabase, testConfig } from '../../support/test-config';

export const TEST_PASSWORD = 'correct-horse-battery';

/** Whether this run's API tests use PostgreSQL (`npm run test:pg` sets DATABASE_URL) rather than SQLite. */
export const isPostgres = /^postgres(ql)?:\/\//.test(process.env.DATABASE_URL ?? '');

export interface Client {
  agent: ReturnType<typeof supertest.agent>;
  csrf: string;
  get: (url: string) => supertest.Test;
  delete: (url: string) => supertest.Test;
  post: (url: string, body?: object) => supertest.Test;
  put: (url: string, body?: object) => supertest.Test;
  patch: (url: string, body?: object) => supertest.Test;
  /** For multipart requests: an agent request with the CSRF header already set. */
  postRaw: (url: string) => supertest.Test;
}

export interface TestApi {
  app: RhologApp;
  /** A signed-out visitor (it has fetched a CSRF token, as the client does). */
  anonymous: () => Promise<Client>;
  /** Signed in as a fresh user of this role (or the given e-mail/password). */
  as: (role: Role) => Promise<Client>;
  signIn: (email: string, password: string) => Promise<Client>;
  users: Record<Role, User>;
  close: () => Promise<void>;
}

async function clientFor(app: RhologApp): Promise<Client> {
  const agent = supertest.agent(app.app);
  const res = await agent.get('/api/auth/csrf').expect(200);
  const c: Client = {
    agent,
    csrf: res.body.csrfToken,
    get: (url) => agent.get(url),
    delete: (url) => agent.delete(url).set('x-csrf-token', c.csrf),
    post: (url, body) => agent.post(url).set('x-csrf-token', c.csrf).send(body ?? {}),
    put: (url, body) => agent.put(url).set('x-csrf-token', c.csrf).send(body ?? {}),
    patch: (url, body) => agent.patch(url).set('x-csrf-token', c.csrf).send(body ?? {}),
    postRaw: (url) => agent.post(url).set('x-csrf-token', c.csrf),
  };
  return c;
}

/** The real app on a fresh database (SQLite file, or PostgreSQL when DATABASE_URL says so), with one user per role. */
export async function startApi(overrides: Partial<AppConfig> = {}, options: { logDestination?: DestinationStream } = {}): Promise<TestApi> {
  const db = await freshDatabase();
  const app = await createApp(testConfig(db.url, db.dir, overrides), options);
  const hash = await hashPassword(TEST_PASSWORD);
  const users = {} as Record<Role, User>;
  const names: Record<Role, string> = { technician: 'Tess Tech', supervisor: 'Sol Super', planner: 'Pat Plan', admin: 'Ada Admin' };
  for (const role of ['technician', 'supervisor', 'planner', 'admin'] as const) {
    users[role] =
      (await User.findOne({ where: { email: `${role}.test@example.com` } })) ??
      (await User.create({ email: `${role}.test@example.com`, name: names[role], role, passwordHash: hash }));
  }
  const signIn = async (email: string, password: string) => {
    const c = await clientFor(app);
    const res = await c.post('/api/auth/login', { email, password });
    if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
    c.csrf = res.body.csrfToken;
    return c;
  };
  return {
    app,
    users,
    anonymous: () => clientFor(app),
    signIn,
    as: (role) => signIn(`${role}.test@example.com`, TEST_PASSWORD),
    close: async () => {
      await app.close();
      await db.cleanup();
    },
  };
}

/** The app listening on a free loopback port, for tests that need raw sockets; `sockets` holds the open connections. */
export interface LoopbackServer {
  port: number;
  sockets: Set<Socket>;
  /** Ends every connection, then stops listening. */
  close: () => Promise<void>;
}

export async function listenOnLoopback(api: TestApi): Promise<LoopbackServer> {
  const server = api.app.app.listen(0, '127.0.0.1');
  const sockets = new Set<Socket>();
  server.on('connection', (s) => {
    sockets.add(s);
    s.on('close', () => sockets.delete(s));
  });
  await new Promise((r) => server.once('listening', r));
  return {
    port: (server.address() as AddressInfo).port,
    sockets,
    close: async () => {
      for (const s of sockets) s.destroy();
      await new Promise((r) => server.close(r));
    },
  };
}
