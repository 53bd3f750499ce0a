import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Finding, FindingDecision, MailJob } from '../../server/db/models';
import { startApi, type TestApi } from './support/api';
import { stepTraceCsv } from './support/field-fixtures';
import { eventually } from './mail.support';
import { supervisedRun } from './tickets.support';

let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

async function dismissedFinding(name: string) {
  const fx = await supervisedRun(api, name);
  const tess = await api.as('technician');
  const up = await tess
    .postRaw('/api/traces')
    .field('cableRunId', String(fx.run.id))
    .field('end', 'A')
    .attach('file', Buffer.from(stepTraceCsv({ faultM: 90, vf: 0.66 })), `${name}.csv`)
    .expect(201);
  const f = await tess.post('/api/findings', { traceId: up.body.traces[0].id, eventIndex: 0, status: 'dismissed', kind: 'not-a-fault' }).expect(201);
  return f.body.id as number;
}

describe('reversing a decision names the status it wants', () => {
  it('of 16 identical reversals sent at once, exactly one takes effect and one e-mail goes out', async () => {
    const id = await dismissedFinding('Reverse race run');
    const sup = await api.as('supervisor');
    const body = { to: 'confirmed', reason: 'Crew saw water in the splice at that distance', kind: 'splice-fault' };
    const answers = await Promise.all(Array.from({ length: 16 }, () => sup.post(`/api/findings/${id}/reverse`, body)));
    const statuses = answers.map((a) => a.status).sort();
    expect(statuses).toEqual([200, ...Array(15).fill(409)]);
    for (const a of answers.filter((x) => x.status === 409)) {
      expect(a.body.error.code).toBe('decision_changed');
      expect(a.body.error.message).toBe(
        `Finding ${id} is already confirmed: someone reversed it meanwhile, or this request was sent twice. Nothing was changed; reload the finding to see its history.`,
      );
    }
    expect((await Finding.findByPk(id))!.status).toBe('confirmed');
    expect(await FindingDecision.count({ where: { findingId: id, action: 'reversed' } })).toBe(1);
    // The one confirmation queues one e-mail to the site's supervisor; wait for it, then count.
    await eventually(async () => (await MailJob.count({ where: { findingId: id } })) > 0, 'the confirmation e-mail');
    expect(await MailJob.count({ where: { findingId: id } })).toBe(1);
  });

  it('refuses a reversal to the status the finding already has, and one without a status', async () => {
    const id = await dismissedFinding('Reverse stale run');
    const sup = await api.as('supervisor');
    const stale = await sup.post(`/api/findings/${id}/reverse`, { to: 'dismissed', reason: 'It is only the splice, not a fault' }).expect(409);
    expect(stale.body.error).toMatchObject({ code: 'decision_changed', fields: [{ field: 'to', message: 'the finding is already dismissed' }] });
    const none = await sup.post(`/api/findings/${id}/reverse`, { reason: 'Crew saw water in the splice', kind: 'splice-fault' }).expect(400);
    expect(none.body.error.fields).toEqual([{ field: 'to', message: "is required: the status the finding is to have, 'confirmed' or 'dismissed'" }]);
    expect(await FindingDecision.count({ where: { findingId: id } })).toBe(1);
  });
});
