import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { loadConfig, type AppConfig } from '../../server/config';

/**
 * A fresh database for one test file: a new SQLite file by default, or, when
 * DATABASE_URL points at PostgreSQL (the CI's second pass), a new database on
 * that server, dropped again by cleanup().
 */
export async function freshDatabase(): Promise<{ url: string; dir: string; cleanup: () => Promise<void> }> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-test-'));
  const base = process.env.DATABASE_URL;
  if (base && /^postgres(ql)?:\/\//.test(base)) {
    const name = `rholog_t_${randomBytes(6).toString('hex')}`;
    const admin = new pg.Client({ connectionString: base });
    await admin.connect();
    await admin.query(`CREATE DATABASE ${name}`);
    await admin.end();
    const url = new URL(base);
    url.pathname = `/${name}`;
    return {
      url: url.toString(),
      dir,
      cleanup: async () => {
        const c = new pg.Client({ connectionString: base });
        await c.connect();
        try {
          // FORCE ends this role's own sessions on the database, but not a server process of another role: an
          // autovacuum worker busy on it is refused (42501), one still leaving holds it (55006). Such a worker
          // is gone within moments, so the drop is tried again for a few seconds; a database still there after
          // that is one unique name left on the test server, which no other test file uses.
          for (let attempt = 0; ; attempt++) {
            try {
              await c.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
              break;
            } catch (err) {
              const code = (err as { code?: string }).code;
              if ((code !== '42501' && code !== '55006') || attempt >= 30) {
                if (code === '42501' || code === '55006') break;
                throw err;
              }
              await new Promise((r) => setTimeout(r, 200));
            }
          }
        } finally {
          await c.end();
        }
        fs.rmSync(dir, { recursive: true, force: true });
      },
    };
  }
  return { url: `sqlite:${path.join(dir, 'rholog.sqlite')}`, dir, cleanup: async () => fs.rmSync(dir, { recursive: true, force: true }) };
}

export function testConfig(databaseUrl: string, dir: string, overrides: Partial<AppConfig> = {}): AppConfig {
  const base = loadConfig({
    NODE_ENV: 'test',
    DATABASE_URL: databaseUrl,
    UPLOAD_DIR: path.join(dir, 'uploads'),
    DEMO_DATA: 'off',
    // scrypt at N = 2^10 instead of 2^15: a sign-in costs about a millisecond, so no test waits on the machine's speed.
    SCRYPT_COST: '1024',
    LOG_LEVEL: 'silent',
  });
  return { ...base, ...overrides };
}
