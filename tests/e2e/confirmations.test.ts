import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableRun, CableType, Finding, Ticket, User } from '../../server/db/models';
import { stepTraceCsv } from '../support/step-trace';
import { DESKTOP, PHONE, startE2E, type E2E } from './support/browser';

/**
 * Every step that cannot be taken back, or takes something from someone,
 * asks first and says what will happen; Cancel changes nothing.
 */

let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

const as = (email: string, viewport = PHONE) => e2e.pageAs(email, viewport);
/** An API client signed in as `email`, for setting the scene. */
const agentFor = (email: string) => e2e.agentAs(email);

/** Upload a trace with an open `faultM` from end A of the demo feeder; its event nearest the open. */
async function uploadOpen(faultM: number, name: string) {
  const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
  const vf = (await CableType.findByPk(run.cableTypeId))!.vf;
  const { agent, token } = await agentFor('tech@example.com');
  const up = await agent
    .post('/api/traces')
    .set('x-csrf-token', token)
    .field('cableRunId', String(run.id))
    .field('end', 'A')
    .attach('file', Buffer.from(stepTraceCsv({ faultM, vf, samples: 9000 })), name)
    .expect(201);
  const trace = up.body.traces[0];
  const event = trace.analysis.events.reduce((best: { distanceM: number }, e: { distanceM: number }) => (Math.abs(e.distanceM - faultM) < Math.abs(best.distanceM - faultM) ? e : best));
  return { traceId: trace.id as number, eventIndex: event.index as number, agent, token };
}

function dialog(page: Page, name: string | RegExp) {
  return page.getByRole('dialog', { name });
}

describe('steps that ask first', () => {
  it('dismissing an event says what it means, and Cancel records nothing (phone)', async () => {
    const { traceId, eventIndex } = await uploadOpen(230, 'hn3-dismiss.csv');
    const page = await as('tech@example.com');
    await page.goto(`${e2e.baseUrl}/traces/${traceId}`);
    await page.getByRole('button', { name: 'Dismiss…' }).click();
    const d = dialog(page, `Dismiss event ${eventIndex + 1}?`);
    await d.waitFor();
    expect(await d.textContent()).toContain('no supervisor is e-mailed and no repair ticket can be raised from it');
    expect(await d.textContent()).toContain('Only a supervisor can reverse the decision later');
    await e2e.screenshot(page, 'confirm-dismiss-phone');
    await d.getByRole('button', { name: 'Cancel' }).click();
    await d.waitFor({ state: 'hidden' });
    expect(await Finding.count({ where: { traceId, eventIndex } })).toBe(0);
    await page.getByRole('button', { name: 'Dismiss…' }).click();
    await dialog(page, `Dismiss event ${eventIndex + 1}?`).getByRole('button', { name: 'Dismiss the event' }).click();
    await page.getByText('Dismissed').first().waitFor();
    expect((await Finding.findOne({ where: { traceId, eventIndex } }))?.status).toBe('dismissed');
    await page.close();
  });

  it('withdrawing a ticket says it cannot be reopened and who is told; Cancel leaves it as it was (desktop)', async () => {
    const { traceId, eventIndex, agent, token } = await uploadOpen(270, 'hn3-withdraw.csv');
    const f = await agent.post('/api/findings').set('x-csrf-token', token).send({ traceId, eventIndex, status: 'confirmed', kind: 'open-conductor' }).expect(201);
    const sup = await agentFor('supervisor@example.com');
    const tech = (await User.findOne({ where: { email: 'tech@example.com' } }))!;
    const t = await sup.agent.post('/api/tickets').set('x-csrf-token', sup.token).send({ findingIds: [f.body.id], assigneeId: tech.id }).expect(201);
    const page = await as('supervisor@example.com', DESKTOP);
    await page.goto(`${e2e.baseUrl}/tickets/${t.body.id}`);
    // Withdraw is not among the everyday buttons: it sits apart and asks.
    expect(await page.getByRole('button', { name: 'Withdraw', exact: true }).count()).toBe(0);
    await page.getByRole('button', { name: 'Withdraw the ticket…' }).click();
    const d = dialog(page, `Withdraw ticket ${t.body.id}?`);
    await d.waitFor();
    const words = (await d.textContent()) ?? '';
    expect(words).toContain('a withdrawn ticket cannot be reopened');
    expect(words).toContain('Ines Ravelo is told by e-mail');
    await e2e.screenshot(page, 'confirm-withdraw-desktop');
    // Escape is a cancel too.
    await page.keyboard.press('Escape');
    await d.waitFor({ state: 'hidden' });
    expect((await Ticket.findByPk(t.body.id))!.status).toBe('assigned');
    await page.getByRole('button', { name: 'Withdraw the ticket…' }).click();
    await dialog(page, `Withdraw ticket ${t.body.id}?`).getByRole('button', { name: 'Withdraw the ticket' }).click();
    await page.getByText('Withdrawn', { exact: true }).first().waitFor();
    expect((await Ticket.findByPk(t.body.id))!.status).toBe('withdrawn');
    await page.close();
  });

  it('a role change says what the person can then do, and Cancel keeps the old role (phone)', async () => {
    const page = await as('admin@example.com');
    await page.goto(`${e2e.baseUrl}/admin/users`);
    const role = page.getByLabel('Role of Tomas Ekwueme');
    await role.selectOption('planner');
    const d = dialog(page, 'Make Tomas Ekwueme a planner?');
    await d.waitFor();
    expect(await d.textContent()).toContain('As a planner, Tomas Ekwueme can edit sites and the cable library');
    await e2e.screenshot(page, 'confirm-role-phone');
    await d.getByRole('button', { name: 'Cancel' }).click();
    await d.waitFor({ state: 'hidden' });
    expect(await role.inputValue()).toBe('technician');
    expect((await User.findOne({ where: { email: 'tech2@example.com' } }))!.role).toBe('technician');
    await role.selectOption('supervisor');
    await dialog(page, 'Make Tomas Ekwueme a supervisor?').getByRole('button', { name: 'Make them a supervisor' }).click();
    await expect.poll(async () => (await User.findOne({ where: { email: 'tech2@example.com' } }))!.role).toBe('supervisor');
    await User.update({ role: 'technician' }, { where: { email: 'tech2@example.com' } });
    await page.close();
  });

  it('a new password is not offered on your own row, and asks before it signs the person out (phone)', async () => {
    const page = await as('admin@example.com');
    await page.goto(`${e2e.baseUrl}/admin/users`);
    const me = page.getByRole('listitem').filter({ hasText: 'admin@example.com' });
    await me.waitFor();
    expect(await me.getByRole('button', { name: /New password/ }).count()).toBe(0);
    const planner = page.getByRole('listitem').filter({ hasText: 'planner@example.com' });
    const before = (await User.findOne({ where: { email: 'planner@example.com' } }))!.passwordHash;
    await planner.getByRole('button', { name: 'New password…' }).click();
    const d = dialog(page, 'Give Priya Castellanos a new temporary password?');
    expect(await d.textContent()).toContain('Their current password stops working now, and they are signed out on every device.');
    await d.getByRole('button', { name: 'Cancel' }).click();
    expect((await User.findOne({ where: { email: 'planner@example.com' } }))!.passwordHash).toBe(before);
    await planner.getByRole('button', { name: 'New password…' }).click();
    await dialog(page, 'Give Priya Castellanos a new temporary password?').getByRole('button', { name: 'Replace the password' }).click();
    await page.getByText('Temporary password', { exact: true }).waitFor();
    expect((await User.findOne({ where: { email: 'planner@example.com' } }))!.passwordHash).not.toBe(before);
    await page.close();
  });

  it('deactivating someone lists their open repairs and hands them to another technician (desktop)', async () => {
    const ines = (await User.findOne({ where: { email: 'tech@example.com' } }))!;
    const tomas = (await User.findOne({ where: { email: 'tech2@example.com' } }))!;
    const open = await Ticket.findAll({ where: { assigneeId: ines.id, status: ['raised', 'assigned', 'under-way'] }, order: [['id', 'ASC']] });
    expect(open.length).toBeGreaterThan(0);
    const page = await as('admin@example.com', DESKTOP);
    await page.goto(`${e2e.baseUrl}/admin/users`);
    const row = page.getByRole('listitem').filter({ hasText: 'tech@example.com' });
    await row.getByRole('button', { name: 'Deactivate…' }).click();
    const d = dialog(page, 'Deactivate Ines Ravelo?');
    await d.getByTestId('open-repairs').waitFor();
    const words = (await d.textContent()) ?? '';
    expect(words).toContain('They are signed out on every device at once and can no longer sign in.');
    for (const t of open) expect(words).toContain(`Ticket ${t.id}: ${t.title}`);
    await d.getByLabel(/^Hand /).selectOption({ label: 'Tomas Ekwueme' });
    await e2e.screenshot(page, 'confirm-deactivate-desktop');
    await d.getByRole('button', { name: 'Hand over and deactivate' }).click();
    await page.getByText('Ines Ravelo is deactivated').waitFor();
    expect((await User.findByPk(ines.id))!.active).toBe(false);
    const moved = await Ticket.findAll({ where: { id: open.map((t) => t.id) } });
    expect(moved.map((t) => [t.assigneeId, t.status])).toEqual(open.map(() => [tomas.id, 'assigned']));
    await page.close();
  });
});
