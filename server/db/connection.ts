import fs from 'node:fs';
import path from 'node:path';
import { Sequelize } from 'sequelize';

export type Dialect = 'sqlite' | 'postgres';

export function dialectOf(databaseUrl: string): Dialect {
  return databaseUrl.startsWith('sqlite:') ? 'sqlite' : 'postgres';
}

/** `sqlite:relative/or/absolute.sqlite` or `sqlite:///abs/path` → a file path. */
export function sqlitePath(databaseUrl: string): string {
  const rest = databaseUrl.slice('sqlite:'.length).replace(/^\/\/(?=\/)/, '');
  return path.resolve(rest);
}

export async function connect(databaseUrl: string): Promise<Sequelize> {
  if (dialectOf(databaseUrl) === 'sqlite') {
    const storage = sqlitePath(databaseUrl);
    fs.mkdirSync(path.dirname(storage), { recursive: true });
    // One connection: SQLite serialises writers anyway, and a single pool
    // member keeps transactions from tripping over each other (SQLITE_BUSY).
    const sequelize = new Sequelize({
      dialect: 'sqlite',
      storage,
      logging: false,
      pool: { max: 1, min: 0, idle: 60_000 },
      transactionType: 'IMMEDIATE' as never,
    });
    await sequelize.query('PRAGMA journal_mode = WAL;');
    await sequelize.query('PRAGMA foreign_keys = ON;');
    await sequelize.query('PRAGMA busy_timeout = 5000;');
    await sequelize.query('PRAGMA synchronous = NORMAL;');
    return sequelize;
  }
  const sequelize = new Sequelize(databaseUrl, { dialect: 'postgres', logging: false, pool: { max: 5 } });
  await sequelize.authenticate();
  return sequelize;
}
