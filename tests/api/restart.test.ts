import supertest from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { freshDatabase, testConfig } from '../support/test-config';

const dbPromise = freshDatabase();
afterAll(async () => (await dbPromise).cleanup());

describe('a server restart', () => {
  it('keeps the session and the data (sessions live in the database, the secret too)', async () => {
    const db = await dbPromise;
    const config = testConfig(db.url, db.dir, { demoData: true });
    const first = await createApp(config);
    const agent = supertest.agent(first.app);
    const csrf = (await agent.get('/api/auth/csrf')).body.csrfToken;
    const login = await agent
      .post('/api/auth/login')
      .set('x-csrf-token', csrf)
      .send({ email: 'admin@example.com', password: 'rholog-demo' })
      .expect(200);
    const cookie = /rholog\.sid=[^;]+/.exec(String(login.headers['set-cookie']))![0];
    await agent.get('/api/auth/me').expect(200);
    await first.close();

    const second = await createApp(config);
    try {
      const me = await supertest(second.app).get('/api/auth/me').set('cookie', cookie).expect(200);
      expect(me.body).toMatchObject({ email: 'admin@example.com', role: 'admin' });
    } finally {
      await second.close();
    }
  });
});
