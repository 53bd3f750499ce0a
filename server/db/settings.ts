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

export async function setSetting(sequelize: Sequelize, key: string, value: string) {
  await sequelize.query('DELETE FROM app_settings WHERE key = :key', { replacements: { key } });
  await sequelize.query('INSERT INTO app_settings (key, value) VALUES (:key, :value)', { replacements: { key, value } });
}

/** The session-signing secret: from config when given, else generated once and kept in the database so sessions survive a restart. */
export async function sessionSecret(sequelize: Sequelize, configured?: string): Promise<string> {
  if (configured) return configured;
  const stored = await getSetting(sequelize, 'session_secret');
  if (stored) return stored;
  const secret = randomBytes(32).toString('hex');
  await setSetting(sequelize, 'session_secret', secret);
  return secret;
}
