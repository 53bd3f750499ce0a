import { randomBytes } from 'node:crypto';
import { QueryTypes, type Sequelize } from 'sequelize';

/** Small key/value settings kept in the database (works the same on SQLite and PostgreSQL). */
export async function getSetting(sequelize: Sequelize, key: string): Promise<string | null> {
  const rows = await sequelize.query<{ value: string }>('SELECT value FROM app_settings WHERE key = :key', {
    replacements: { key },
    type: QueryTypes.SELECT,
  });
  return rows[0]?.value ?? null;
}

/**
 * Stores `value` under `key` unless the key already has one, and answers the value kept: the first writer's.
 * One statement, so instances doing this at the same moment agree (SQLite ≥ 3.24 and PostgreSQL both read
 * ON CONFLICT … DO NOTHING).
 */
export async function settingOnce(sequelize: Sequelize, key: string, value: string): Promise<string> {
  await sequelize.query('INSERT INTO app_settings (key, value) VALUES (:key, :value) ON CONFLICT (key) DO NOTHING', { replacements: { key, value } });
  const kept = await getSetting(sequelize, key);
  if (kept === null) throw new Error(`The setting ${key} was not kept in app_settings.`);
  return kept;
}

/**
 * The session-signing secret: from config when given, else generated once and kept in the database so sessions
 * survive a restart. Instances started together on a new database all take the one that was kept first.
 */
export async function sessionSecret(sequelize: Sequelize, configured?: string): Promise<string> {
  if (configured) return configured;
  const stored = await getSetting(sequelize, 'session_secret');
  if (stored) return stored;
  return settingOnce(sequelize, 'session_secret', randomBytes(32).toString('hex'));
}
