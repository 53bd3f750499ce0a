import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Trace } from '../../server/db/models';
import { startApi, type TestApi } from './support/api';
import { makeRun, uploadStepTrace } from './support/field-fixtures';

// A trace made its end's reference while its uploader archives it as junk: one of the two must win. An archived
// reference is a trace every later upload of that end is compared with, though nobody sees it in the lists.
// PostgreSQL runs the two transactions side by side.

let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

describe('a reference and an archive of the same trace at once', () => {
  it('never leaves an archived trace as the reference: one of the two is refused', async () => {
    const { run } = await makeRun('Reference or archive');
    const tech = await api.as('technician');
    const sup = await api.as('supervisor');
    for (let i = 0; i < 6; i++) {
      const t = await uploadStepTrace(tech, run.id, 120 + 10 * i);
      const [r, a] = await Promise.all([
        sup.put(`/api/traces/${t.id}/reference`, { isReference: true }),
        tech.post(`/api/traces/${t.id}/archive`, { reason: 'Sent the wrong file' }),
      ]);
      const stored = (await Trace.findByPk(t.id))!;
      if (r.status === 200) {
        expect(a.status).toBe(409);
        expect(a.body.error.code).toBe('is_reference');
        expect([stored.isReference, stored.archivedAt]).toEqual([true, null]);
        // Stop using it as the reference for the next round's upload to be compared with nothing archived.
        await sup.put(`/api/traces/${t.id}/reference`, { isReference: false }).expect(200);
      } else {
        expect(r.status).toBe(409);
        expect(r.body.error.code).toBe('trace_archived');
        expect(a.status).toBe(200);
        expect(stored.isReference).toBe(false);
        expect(stored.archivedAt).not.toBeNull();
      }
    }
  });
});
