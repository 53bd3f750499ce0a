import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Transaction } from 'sequelize';
import { FindingDecision, MailJob } from '../../server/db/models';
import { startApi, type TestApi } from './support/api';
import { stepTraceCsv } from './support/field-fixtures';
import { supervisedRun } from './tickets.support';

/**
 * The site supervisors' e-mail about a confirmed fault is queued in the transaction that confirms it, as every other
 * notice is: a server stopped (killed, restarted, out of memory) between storing the finding and queueing its e-mail
 * must not leave a confirmed fault nobody was told about. So at the moment a confirmation commits, its e-mail is
 * already in the queue.
 */
let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

/** For each decision stored, how many e-mails about its finding were queued at the moment its transaction committed. */
function mailsAtCommit() {
  const seen: Array<{ findingId: number; toStatus: string; mails: number }> = [];
  FindingDecision.addHook('afterCreate', 'mails-at-commit', (d: FindingDecision, options: { transaction?: Transaction | null }) => {
    options.transaction?.afterCommit(async () => {
      seen.push({ findingId: d.findingId, toStatus: d.toStatus, mails: await MailJob.count({ where: { findingId: d.findingId, kind: 'finding-confirmed' } }) });
    });
  });
  return { seen, stop: () => FindingDecision.removeHook('afterCreate', 'mails-at-commit') };
}

describe('the e-mail of a confirmed finding', () => {
  it('is queued with the confirmation, and with a reversal to confirmed, in the same transaction', async () => {
    const fx = await supervisedRun(api, 'Notice with commit run');
    const tess = await api.as('technician');
    const sup = await api.as('supervisor');
    const upload = async (faultM: number) =>
      (
        await tess
          .postRaw('/api/traces')
          .field('cableRunId', String(fx.run.id))
          .field('end', 'A')
          .attach('file', Buffer.from(stepTraceCsv({ faultM, vf: 0.66 })), `notice-${faultM}.csv`)
          .expect(201)
      ).body.traces[0].id as number;
    const watch = mailsAtCommit();
    try {
      const first = await tess.post('/api/findings', { traceId: await upload(90), eventIndex: 0, status: 'confirmed', kind: 'open-conductor' }).expect(201);
      const second = await tess.post('/api/findings', { traceId: await upload(150), eventIndex: 0, status: 'dismissed', kind: 'not-a-fault' }).expect(201);
      await sup.post(`/api/findings/${second.body.id}/reverse`, { to: 'confirmed', reason: 'Crew saw water in the splice there', kind: 'splice-fault' }).expect(200);
      expect(watch.seen).toEqual([
        { findingId: first.body.id, toStatus: 'confirmed', mails: 1 },
        { findingId: second.body.id, toStatus: 'dismissed', mails: 0 },
        { findingId: second.body.id, toStatus: 'confirmed', mails: 1 },
      ]);
    } finally {
      watch.stop();
    }
  });
});
