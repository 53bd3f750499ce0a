import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fs from 'node:fs';
import { AnalysisPool, analysisPool } from '../../server/traces/analysis-pool';
import { startApi, type TestApi } from './support/api';
import { eventually } from './mail.support';
import { makeRun, stepTraceCsv } from './support/field-fixtures';

/**
 * The files someone is waiting for share the analysis threads (one on a two-core server). One person sending many
 * files at once, in one upload or in several, must not make everyone else's upload wait behind all of them: each
 * person's files go to the threads one at a time, so another person's file waits for at most one of theirs.
 */
let api: TestApi;
beforeAll(async () => {
  api = await startApi({ analysis: { threads: 1, timeoutMs: 120_000, memoryMb: 256 } });
});
afterAll(() => api.close());

type Run = (task: { path: string }) => Promise<unknown>;

/**
 * Records the files handed to the pool's threads (named by `nameOf`) and the order they are done in; holds the
 * first file whose name passes `hold` before it enters the threads' queue until `release()`. The first, not a named
 * one: the files of one upload reach the pool in the order their own checks finish, which a busy machine changes.
 */
function watchPool(pool: AnalysisPool, nameOf: (path: string) => string, hold: (name: string) => boolean) {
  const real = Reflect.get(AnalysisPool.prototype, 'run') as Run;
  const called: string[] = [];
  const done: string[] = [];
  let release!: () => void;
  const released = new Promise<void>((r) => (release = r));
  let held: string | null = null;
  Reflect.set(pool, 'run', async function (this: AnalysisPool, task: { path: string }) {
    const name = nameOf(task.path);
    called.push(name);
    if (held === null && hold(name)) {
      held = name;
      await released;
    }
    const r = await real.call(this, task);
    done.push(name);
    return r;
  });
  return { called, done, release, restore: () => Reflect.deleteProperty(pool, 'run') };
}

describe('analysis threads shared between uploaders', () => {
  it('analyses another person’s file before the rest of a many-file upload', async () => {
    const { run } = await makeRun('Fair share run');
    const tess = await api.as('technician');
    const sol = await api.as('supervisor');
    const pool = analysisPool(api.app.ctx);
    // The worker has the engine loaded before the order is looked at.
    await tess.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'B').attach('file', Buffer.from(stepTraceCsv({ faultM: 30, vf: 0.66 })), 'warm.csv').expect(201);

    // Inbox files have random names: each is known by its bytes.
    const many = [40, 50, 60, 70, 80, 90].map((m) => ({ name: `many-${m}.csv`, csv: stepTraceCsv({ faultM: m, vf: 0.66 }) }));
    const one = { name: 'other-person.csv', csv: stepTraceCsv({ faultM: 120, vf: 0.66 }) };
    const byContent = new Map([...many, one].map((f) => [f.csv, f.name]));
    const watch = watchPool(pool, (p) => byContent.get(fs.readFileSync(p, 'utf8')) ?? p, (name) => name.startsWith('many-'));
    try {
      let upload = tess.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'A');
      for (const f of many) upload = upload.attach('file', Buffer.from(f.csv), f.name);
      const manyAnswer = upload.then((r) => r);
      await eventually(async () => watch.called.some((n) => n.startsWith('many-')), 'the first file of the many reaching the pool');
      const otherAnswer = sol
        .postRaw('/api/traces')
        .field('cableRunId', String(run.id))
        .field('end', 'A')
        .attach('file', Buffer.from(one.csv), one.name)
        .then((r) => r);
      await eventually(async () => watch.called.includes('other-person.csv'), 'the other person’s file reaching the pool');
      watch.release();
      const [a, b] = await Promise.all([manyAnswer, otherAnswer]);
      expect(a.status).toBe(201);
      expect(b.status).toBe(201);
      expect(a.body.traces).toHaveLength(6);
      // One thread: the other person's file is done before all but (at most) the first of the six.
      expect(watch.done.indexOf('other-person.csv')).toBeLessThanOrEqual(1);
    } finally {
      watch.restore();
    }
  }, 120_000);
});
