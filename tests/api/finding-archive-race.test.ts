import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Finding, Trace } from '../../server/db/models';
import { startApi, type TestApi } from './support/api';
import { makeRun, uploadStepTrace } from './support/field-fixtures';

// A finding made from a trace while its uploader archives the same trace as junk: one of the two
// must win. A finding resting on an archived trace is a record nobody sees in the lists.

let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

describe('a finding and an archive of the same trace at once', () => {
  it('never leaves a finding on an archived trace: one of the two is refused', async () => {
    const { run } = await makeRun('Finding or archive');
    const tech = await api.as('technician');
    const outcomes: string[] = [];
    for (let i = 0; i < 6; i++) {
      const t = await uploadStepTrace(tech, run.id, 120 + 10 * i);
      const [f, a] = await Promise.all([
        tech.post('/api/findings', { traceId: t.id, eventIndex: t.far.index, status: 'confirmed', kind: 'open-conductor' }),
        tech.post(`/api/traces/${t.id}/archive`, { reason: 'Sent the wrong file' }),
      ]);
      const archived = (await Trace.findByPk(t.id))!.archivedAt !== null;
      const findings = await Finding.count({ where: { traceId: t.id } });
      if (f.status === 201) {
        expect(a.status).toBe(409);
        expect(a.body.error.code).toBe('has_findings');
        expect([archived, findings]).toEqual([false, 1]);
        outcomes.push('finding');
      } else {
        expect(f.status).toBe(409);
        expect(f.body.error.code).toBe('trace_archived');
        expect(a.status).toBe(200);
        expect([archived, findings]).toEqual([true, 0]);
        outcomes.push('archive');
      }
    }
    expect(outcomes).toHaveLength(6);
  });
});
