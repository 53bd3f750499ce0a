import type { QueryInterface, Sequelize } from 'sequelize';
import { SequelizeStorage, Umzug, type MigrationFn } from 'umzug';
import * as m0001 from './0001-users-and-sessions';
import * as m0002 from './0002-cable-types';
import * as m0003 from './0003-field-workflow';
import * as m0004 from './0004-cable-library';
import * as m0005 from './0005-mail';
import * as m0006 from './0006-tickets';
import * as m0007 from './0007-trace-reanalysis';
import * as m0008 from './0008-cable-loss';
import * as m0009 from './0009-upload-integrity';
import * as m0010 from './0010-decision-history';
import * as m0011 from './0011-fusion-measurements';
import * as m0012 from './0012-outcomes';
import * as m0013 from './0013-method-scores';
import * as m0014 from './0014-device-analysis';
import * as m0015 from './0015-list-indexes';
import * as m0016 from './0016-shared-limits-and-cable-reanalysis';
import * as m0017 from './0017-background-analysis';
import * as m0018 from './0018-findings-text-index';
import * as m0019 from './0019-trace-reference-index';
import * as m0020 from './0020-name-keys';
import * as m0021 from './0021-request-receipts';
import * as m0022 from './0022-trace-cable-type';

export type Migration = MigrationFn<QueryInterface>;

/**
 * Every schema change is a numbered migration listed here, in order.
 * Never edit one that has shipped: add the next number.
 */
const MIGRATIONS: Array<{ name: string; up: Migration; down: Migration }> = [
  { name: '0001-users-and-sessions', ...m0001 },
  { name: '0002-cable-types', ...m0002 },
  { name: '0003-field-workflow', ...m0003 },
  { name: '0004-cable-library', ...m0004 },
  { name: '0005-mail', ...m0005 },
  { name: '0006-tickets', ...m0006 },
  { name: '0007-trace-reanalysis', ...m0007 },
  { name: '0008-cable-loss', ...m0008 },
  { name: '0009-upload-integrity', ...m0009 },
  { name: '0010-decision-history', ...m0010 },
  { name: '0011-fusion-measurements', ...m0011 },
  { name: '0012-outcomes', ...m0012 },
  { name: '0013-method-scores', ...m0013 },
  { name: '0014-device-analysis', ...m0014 },
  { name: '0015-list-indexes', ...m0015 },
  { name: '0016-shared-limits-and-cable-reanalysis', ...m0016 },
  { name: '0017-background-analysis', ...m0017 },
  { name: '0018-findings-text-index', ...m0018 },
  { name: '0019-trace-reference-index', ...m0019 },
  { name: '0020-name-keys', ...m0020 },
  { name: '0021-request-receipts', ...m0021 },
  { name: '0022-trace-cable-type', ...m0022 },
];

export function migrator(sequelize: Sequelize) {
  return new Umzug<QueryInterface>({
    migrations: MIGRATIONS,
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  });
}

/** Any fixed number: the PostgreSQL advisory lock that lets one instance at a time run the migrations. */
const MIGRATION_LOCK = 7_460_301;

/**
 * Bring the schema up to date. On PostgreSQL, instances starting together
 * take turns through an advisory lock held on one connection for the whole
 * run; the next one then finds nothing left to do.
 */
export async function migrate(sequelize: Sequelize) {
  if (sequelize.getDialect() !== 'postgres') return migrator(sequelize).up();
  return sequelize.transaction(async (transaction) => {
    await sequelize.query('SELECT pg_advisory_xact_lock(:key)', { replacements: { key: MIGRATION_LOCK }, transaction });
    return migrator(sequelize).up();
  });
}

/** Migrations not yet run (for /api/ready). */
export async function pendingMigrations(sequelize: Sequelize): Promise<string[]> {
  return (await migrator(sequelize).pending()).map((m) => m.name);
}
