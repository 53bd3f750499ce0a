import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getSetting, sessionSecret } from '../../server/db/settings';
import { startApi, type TestApi } from './support/api';

/**
 * Without SESSION_SECRET the cookie-signing secret is generated once and kept in the database. Instances started
 * together on a new database (several behind a proxy) must all sign with the one secret that was kept: an instance
 * holding another one would refuse every session and CSRF token the others made.
 */
let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

describe('the session secret kept in the database', () => {
  it('is the same for instances that start at the same moment, and is the one stored', async () => {
    const sequelize = api.app.ctx.sequelize;
    await sequelize.query("DELETE FROM app_settings WHERE key = 'session_secret'");
    const secrets = await Promise.all(Array.from({ length: 4 }, () => sessionSecret(sequelize)));
    const stored = await getSetting(sequelize, 'session_secret');
    expect(stored).toMatch(/^[0-9a-f]{64}$/);
    expect(secrets).toEqual(Array(4).fill(stored));
    const rows = await sequelize.query("SELECT value FROM app_settings WHERE key = 'session_secret'", { type: QueryTypes.SELECT });
    expect(rows).toHaveLength(1);
    // A later start reads the same one.
    expect(await sessionSecret(sequelize)).toBe(stored);
  });
});
