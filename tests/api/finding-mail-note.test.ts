import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MailJob } from '../../server/db/models';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type TestApi } from './support/api';

let api: TestApi;
let fx: Awaited<ReturnType<typeof makeRun>>;

beforeAll(async () => {
  api = await startApi();
  // No supervisor named for this site: every supervisor is e-mailed, and told why.
  fx = await makeRun('Unsupervised mail run');
});
afterAll(() => api.close());

describe('the e-mail of a confirmed finding on a site with no supervisor named', () => {
  it('keeps the technician’s note apart from the sentence that says why every supervisor got it', async () => {
    const c = await api.as('technician');
    const up = await c.postRaw('/api/traces').field('cableRunId', String(fx.run.id)).field('end', 'A').attach('file', Buffer.from(stepTraceCsv({ faultM: 100, vf: 0.66 })), 'note.csv').expect(201);
    const f = await c.post('/api/findings', { traceId: up.body.traces[0].id, eventIndex: 0, status: 'confirmed', kind: 'open-conductor', note: 'Cable crushed by a digger' }).expect(201);
    await expect.poll(() => MailJob.count({ where: { findingId: f.body.id, kind: 'finding-confirmed' } }), { timeout: 10_000 }).toBeGreaterThan(0);
    const job = (await MailJob.findOne({ where: { findingId: f.body.id, kind: 'finding-confirmed' } }))!;
    const flat = job.text.replace(/\s+/g, ' ');
    // The note ends without a full stop; a sentence joined straight after it read "… by a digger No supervisor is named …".
    expect(flat).not.toMatch(/digger No supervisor/);
    expect(flat).toMatch(/confirmed a fault \(Open conductor\) at [^.]+\. No supervisor is named for this site, so every supervisor gets this message\./);
    expect(flat).toContain('Note: Cable crushed by a digger');
    expect(job.html).toContain('<p>Note: Cable crushed by a digger</p>');
  });
});
