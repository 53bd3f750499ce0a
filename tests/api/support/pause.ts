import { QueryTypes, type ModelStatic, type Model } from 'sequelize';
import { isPostgres, type TestApi } from './api';

export interface Pause {
  /** Resolves once the paused read has happened (the request is held inside its transaction). */
  reached: Promise<void>;
  /** Lets the held request go on and takes the hook away. */
  release: () => void;
}

/**
 * Holds the first read of `model` that `matches` until `release()`, so a test can send a second request at
 * exactly that moment: by default a read made inside a transaction (a write under way), or with
 * `{ inTransaction: false }` one made outside any (the check a request makes before it writes). `name` names the
 * hook (one pause per model at a time).
 */
export function pauseFirstRead<M extends Model>(
  model: ModelStatic<M>,
  name: string,
  matches: (result: unknown, options: { transaction?: unknown; where?: unknown }) => boolean,
  { inTransaction = true }: { inTransaction?: boolean } = {},
): Pause {
  let reached!: () => void;
  let release!: () => void;
  const reachedP = new Promise<void>((r) => (reached = r));
  const released = new Promise<void>((r) => (release = r));
  let armed = true;
  model.addHook('afterFind', name, async (result: unknown, options: { transaction?: unknown; where?: unknown }) => {
    if (!armed || Boolean(options.transaction) !== inTransaction || !matches(result, options)) return;
    armed = false;
    reached();
    await released;
  });
  return {
    reached: reachedP,
    release: () => {
      model.removeHook('afterFind', name);
      release();
    },
  };
}

/** True when a found row (or any of found rows) has id `id`. */
export const foundId = (result: unknown, id: number) =>
  (Array.isArray(result) ? result : [result]).some((r) => (r as { id?: number } | null)?.id === id);

/** True once a database session waits for a row lock (PostgreSQL); SQLite runs one write transaction at a time anyway. */
export async function someoneWaitsForALock(api: TestApi): Promise<boolean> {
  if (!isPostgres) return true;
  const [row] = await api.app.ctx.sequelize.query<{ n: string }>(
    "SELECT count(*) AS n FROM pg_stat_activity WHERE datname = current_database() AND wait_event_type = 'Lock'",
    { type: QueryTypes.SELECT },
  );
  return Number(row.n) > 0;
}
