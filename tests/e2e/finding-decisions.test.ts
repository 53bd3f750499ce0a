import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableRun, CableType, Finding, FindingDecision } from '../../server/db/models';
import { stepTraceCsv } from '../support/step-trace';
import { DESKTOP, PHONE, startE2E, type E2E } from './support/browser';

let e2e: E2E;
let findingId: number;
let traceId: number;

beforeAll(async () => {
  e2e = await startE2E();
  // The demo technician uploads a trace of the demo feeder (an open 250 m from end A) and confirms its event.
  const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
  const vf = (await CableType.findByPk(run.cableTypeId))!.vf;
  const { agent, token } = await e2e.agentAs('tech@example.com');
  const up = await agent
    .post('/api/traces')
    .set('x-csrf-token', token)
    .field('cableRunId', String(run.id))
    .field('end', 'A')
    .attach('file', Buffer.from(stepTraceCsv({ faultM: 250, vf, samples: 9000 })), 'hn3-decision.csv')
    .expect(201);
  traceId = up.body.traces[0].id;
  const event = up.body.traces[0].analysis.events.reduce((best: { distanceM: number; index: number }, e: { distanceM: number; index: number }) =>
    Math.abs(e.distanceM - 250) < Math.abs(best.distanceM - 250) ? e : best,
  );
  const f = await agent.post('/api/findings').set('x-csrf-token', token).send({ traceId, eventIndex: event.index, status: 'confirmed', kind: 'open-conductor' }).expect(201);
  findingId = f.body.id;
});
afterAll(() => e2e?.stop());

describe('a decision on an event', () => {
  it('is not offered to a technician on someone else’s trace', async () => {
    const page = await e2e.pageAs('tech2@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/findings/${findingId}`);
    await page.getByRole('heading', { name: /Decision history/ }).waitFor();
    expect(await page.getByRole('button', { name: /Reverse/ }).count()).toBe(0);
    await page.close();
  });

  it('is reversed by a supervisor with a reason, after a confirmation, and kept in the history', async () => {
    const page = await e2e.pageAs('supervisor@example.com', DESKTOP);
    await page.goto(`${e2e.baseUrl}/findings/${findingId}`);
    await page.getByText(/Decided: confirmed as a fault \(Open conductor\) by/).waitFor();
    await page.getByRole('button', { name: 'Reverse: dismiss this fault…' }).click();
    const form = page.getByRole('form', { name: 'Reverse the decision' });
    await form.getByLabel('Reason (kept in the history)').fill('Crew found the joint dry; the step is the cable end of a spur');
    await form.getByRole('button', { name: 'Reverse the decision…' }).click();
    const dialog = page.getByRole('dialog', { name: `Reverse the decision on finding ${findingId}?` });
    await dialog.getByText(`Finding ${findingId} will be dismissed (Not a fault (known feature)).`).waitFor();
    await e2e.screenshot(page, 'finding-reverse-confirm');
    await dialog.getByRole('button', { name: 'Dismiss the fault' }).click();
    await page.getByText(/Reversed: dismissed \(Not a fault \(known feature\)\) by Maren Holt/).waitFor();
    await page.getByText('Reason: Crew found the joint dry; the step is the cable end of a spur').waitFor();
    await e2e.screenshot(page, 'finding-reversed');
    expect((await Finding.findByPk(findingId))!.status).toBe('dismissed');
    expect(await FindingDecision.count({ where: { findingId } })).toBe(2);
    await page.close();
  });
});
