import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableCalibration, CableRun, CableType, RouteMarker, Ticket, TicketCloseout } from '../../server/db/models';
import { stepTraceCsv } from '../support/step-trace';
import { DESKTOP, PHONE, startE2E, type E2E } from './support/browser';

let e2e: E2E;
let findingId: number;
let locatedM: number;
let runVf: number;
let mh2Id: number;

/** The first number in a text ("400.00 m of cable …" → 400). */
const number = (s: string | null) => Number((s ?? '').match(/\d+(\.\d+)?/)?.[0] ?? NaN);

beforeAll(async () => {
  e2e = await startE2E();
  // A fresh confirmed finding on the demo feeder: an open 400 m of cable from end A, written with the run's own VF.
  const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
  runVf = (await CableType.findByPk(run.cableTypeId))!.vf;
  mh2Id = (await RouteMarker.findOne({ where: { cableRunId: run.id, label: 'MH-2' } }))!.id;
  const { agent, token } = await e2e.agentAs('tech@example.com');
  const up = await agent
    .post('/api/traces')
    .set('x-csrf-token', token)
    .field('cableRunId', String(run.id))
    .field('end', 'A')
    .attach('file', Buffer.from(stepTraceCsv({ faultM: 400, vf: runVf, samples: 9000 })), 'hn3-ticket.csv')
    .expect(201);
  const trace = up.body.traces[0];
  const event = trace.analysis.events.reduce((best: { distanceM: number; index: number }, e: { distanceM: number; index: number }) =>
    Math.abs(e.distanceM - 400) < Math.abs(best.distanceM - 400) ? e : best,
  );
  const f = await agent.post('/api/findings').set('x-csrf-token', token).send({ traceId: trace.id, eventIndex: event.index, status: 'confirmed', kind: 'water-ingress', note: 'Ticket walk-through' }).expect(201);
  findingId = f.body.id;
  locatedM = f.body.distanceM;
});
afterAll(async () => {
  await e2e?.stop();
});

describe('a repair from assignment to calibration', () => {
  let ticketPath = '';

  it('the supervisor’s start page shows the new finding first among those waiting for a repair ticket, with its Raise ticket step', async () => {
    const page = await e2e.pageAs('supervisor@example.com', DESKTOP);
    await page.goto(`${e2e.baseUrl}/`);
    const list = page.getByTestId('unticketed-findings');
    await list.waitFor();
    const waiting = await page.evaluate(async () => ((await (await fetch('/api/tickets/unticketed-findings')).json()) as unknown[]).length);
    expect(waiting).toBeGreaterThan(0);
    expect(await page.getByText(/^Findings waiting for a repair ticket \(\d+\)$/).textContent()).toBe(`Findings waiting for a repair ticket (${waiting})`);
    expect(await list.locator('li').count()).toBe(Math.min(5, waiting));
    // Newest first: the finding confirmed above, with the step that gives it a ticket.
    const first = list.locator('li').first();
    expect(await first.getByRole('link', { name: 'Raise ticket' }).getAttribute('href')).toBe(`/tickets?finding=${findingId}`);
    expect(await first.getByRole('link').first().getAttribute('href')).toBe(`/findings/${findingId}`);
    // It stands before the upload button: raising the ticket is the supervisor's next step.
    expect(await page.evaluate(() => !!(document.querySelector('[data-testid="unticketed-findings"]')!.compareDocumentPosition(document.querySelector('[data-testid="home-upload"]')!) & 4))).toBe(true);
    await e2e.screenshot(page, 'home-supervisor-waiting-desktop');
    await page.close();
    const tech = await e2e.pageAs('tech2@example.com', PHONE);
    await tech.goto(`${e2e.baseUrl}/`);
    await tech.getByTestId('home-upload').waitFor();
    expect(await tech.getByTestId('unticketed-findings').count()).toBe(0);
    await tech.close();
  });

  it('a supervisor raises a ticket from the finding and assigns a technician', async () => {
    const page = await e2e.pageAs('supervisor@example.com', DESKTOP);
    await page.locator('aside').getByRole('link', { name: 'Tickets' }).click();
    await page.getByRole('heading', { name: 'Tickets', exact: true }).waitFor();
    const form = page.getByRole('form', { name: 'Raise a ticket' });
    await form.getByLabel(`Finding ${findingId}`).check();
    await form.getByLabel('Assign to').selectOption({ label: 'Ines Ravelo' });
    await form.getByLabel('Priority').selectOption('high');
    await form.getByLabel('Notes for the crew').fill('Gate key at the depot.');
    await e2e.screenshot(page, 'tickets-supervisor-desktop');
    await form.getByRole('button', { name: 'Raise ticket' }).click();
    await page.getByRole('heading', { name: /^Ticket \d+: Water in the cable on Feeder HN-3 to Ashby Lane$/ }).waitFor();
    ticketPath = new URL(page.url()).pathname;
    expect(await page.getByText('Assigned to Ines Ravelo').first().isVisible()).toBe(true);
    const timeline = await page.getByTestId('ticket-timeline').textContent();
    expect(timeline).toContain('Maren Holt raised the ticket');
    expect(timeline).toContain('Raised → Assigned');
    // Starting the work and recording the repair are Ines's steps, not the supervisor's: only withdrawing is offered here.
    expect(await page.getByRole('button', { name: 'Start work' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Record the repair' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Withdraw the ticket…' }).isVisible()).toBe(true);
    await e2e.screenshot(page, 'ticket-supervisor-desktop');
    // The crew sheet as it prints: no navigation, no buttons, the caution on the page.
    await page.getByRole('link', { name: 'Crew sheet' }).click();
    await page.getByTestId('sheet-trace').locator('canvas').waitFor();
    await page.emulateMedia({ media: 'print' });
    expect(await page.locator('aside').first().isVisible()).toBe(false);
    expect(await page.getByRole('button', { name: 'Print' }).isVisible()).toBe(false);
    expect(await page.getByRole('note', { name: 'Safety caution' }).isVisible()).toBe(true);
    await e2e.screenshot(page, 'ticket-sheet-print');
    await page.close();
  });

  it('the technician sees it first on a phone, starts, and closes it out with the found position', async () => {
    const page = await e2e.pageAs('tech@example.com', PHONE);
    await page.getByRole('button', { name: 'Menu' }).click();
    await page.getByRole('link', { name: 'Tickets' }).first().click();
    const rows = page.getByTestId('ticket-row');
    await rows.first().waitFor();
    // Their own tickets come first: every "yours" row before any other.
    const mine = (await rows.allTextContents()).map((t) => t.includes('Yours'));
    expect(mine[0]).toBe(true);
    expect(mine.indexOf(false) === -1 || mine.lastIndexOf(true) < mine.indexOf(false)).toBe(true);
    const ours = rows.filter({ hasText: 'Water in the cable on Feeder HN-3 to Ashby Lane' });
    expect(await ours.textContent()).toContain('Yours');
    await e2e.screenshot(page, 'tickets-technician-phone');
    await ours.click();
    await page.waitForURL((u) => u.pathname === ticketPath);

    // The crew sheet first, as printed for the dig.
    await page.getByRole('link', { name: 'Crew sheet' }).click();
    await page.getByRole('article', { name: 'Crew sheet' }).waitFor();
    await page.getByTestId('sheet-trace').locator('canvas').waitFor();
    expect(await page.getByRole('note', { name: 'Safety caution' }).isVisible()).toBe(true);
    expect(number(await page.getByTestId('sheet-distance').textContent())).toBeCloseTo(locatedM, 0);
    // Hand-worked: 400 m of cable passes MH-1 (4 m coiled) and MH-2 (6 m) → 390 m of route, 80 m past MH-2.
    expect(await page.getByTestId('sheet-route-position').textContent()).toMatch(/^(79|80)\.\d m past manhole MH-2 toward road crossing RC-1/);
    await e2e.screenshot(page, 'ticket-sheet-phone');
    await page.getByRole('link', { name: /Back to ticket/ }).click();

    // The way from the ticket to its finding is a thumb's target on the phone (44 px, the look's rule for gloves), named as such.
    const toFinding = page.getByRole('link', { name: `Open finding ${findingId}`, exact: true });
    expect(await toFinding.getAttribute('href')).toBe(`/findings/${findingId}`);
    const box = (await toFinding.boundingBox())!;
    expect(box.height).toBeGreaterThanOrEqual(44);
    expect(box.width).toBeGreaterThanOrEqual(44);

    await page.getByRole('button', { name: 'Start work' }).click();
    await page.getByText('Under way', { exact: true }).first().waitFor();
    const form = page.getByRole('form', { name: 'Close-out' });
    await form.getByLabel('Route marker').selectOption(String(mh2Id));
    // The marker reads as it does on the route page: its kind once, then where it lies.
    // The marker reads as it does on the route page, after where it lies: the distance leads, so a narrow select still shows it.
    expect(await form.getByLabel('Route marker').locator('option:checked').textContent()).toBe('310.0 m · Manhole MH-2');
    expect(await form.getByText('Distances from end A (Substation bay 3), on the ground.').isVisible()).toBe(true);
    // On the phone every marker's words fit the closed select (its padding and arrow kept clear), so none is cut off.
    const cut = await form.getByLabel('Route marker').evaluate((el: HTMLSelectElement) => {
      const style = getComputedStyle(el);
      const pen = document.createElement('canvas').getContext('2d')!;
      pen.font = style.font;
      const room = el.clientWidth - parseFloat(style.paddingLeft) - parseFloat(style.paddingRight) - 24;
      return [...el.options].filter((o) => pen.measureText(o.text).width > room).map((o) => o.text);
    });
    expect(cut).toEqual([]);
    await form.getByLabel('Distance past it toward end B (m)').fill('85');
    // Hand-worked: 85 m past MH-2 (310 m) is 395 m of route; the 4 + 6 m coils lie before it → 405 m of cable.
    const preview = form.getByTestId('closeout-preview');
    await preview.waitFor();
    expect(await preview.textContent()).toContain('405.0 m');
    await form.getByLabel('What was it?').selectOption('water-ingress');
    await form.getByLabel('What was done').fill('Cut out the wet length, new straight joint');
    await e2e.screenshot(page, 'ticket-closeout-phone');
    await form.getByRole('button', { name: 'Record the repair' }).click();
    const summary = page.getByTestId('closeout-summary');
    await summary.waitFor();
    // Located ≈ 400 m, found 405 m: about −5 m; VF_implied = VF_run · 405/400 (d = VF·c·t/2 solved for VF).
    const err = await page.getByTestId('closeout-error').textContent();
    expect(err).toMatch(/^−\d/);
    expect(number(err)).toBeCloseTo(405 - locatedM, 1);
    expect(number(await page.getByTestId('closeout-vf').textContent())).toBeCloseTo((runVf * 405) / 400, 2);
    expect(await page.getByText('Fixed, awaiting sign-off').first().isVisible()).toBe(true);
    await page.evaluate(() => window.scrollTo(0, 0));
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
    await e2e.screenshot(page, 'ticket-fixed-phone');
    await page.close();
  });

  it('the planner sees the new calibration in the review queue', async () => {
    const closeout = (await TicketCloseout.findOne({ where: { findingId } }))!;
    const cal = (await CableCalibration.findByPk(closeout.calibrationId!))!;
    expect(cal.source).toBe('repair-closeout');
    expect(cal.knownLengthM).toBeCloseTo(405, 9);
    const page = await e2e.pageAs('planner@example.com', DESKTOP);
    await page.locator('aside').getByRole('link', { name: 'Calibrations' }).click();
    await page.getByRole('heading', { name: 'Calibrations', exact: true }).waitFor();
    await page.getByText('Repair close-out').first().waitFor();
    expect(await page.getByText(cal.vf.toFixed(3)).first().isVisible()).toBe(true);
    // Where the number came from is one click away: the repair ticket that filed it and the trace it was read off.
    const item = page.getByTestId(`calibration-${cal.id}`);
    expect(await item.getByRole('link', { name: `ticket ${closeout.ticketId}` }).getAttribute('href')).toBe(`/tickets/${closeout.ticketId}`);
    expect(await item.getByRole('link', { name: `trace ${cal.traceId}` }).getAttribute('href')).toBe(`/traces/${cal.traceId}`);
    await e2e.screenshot(page, 'calibrations-planner-desktop');
    await page.close();
  });

  it('the dashboard and the outbox show the story', async () => {
    const page = await e2e.pageAs('supervisor@example.com', DESKTOP);
    await page.locator('aside').getByRole('link', { name: 'Dashboard' }).click();
    await page.getByRole('heading', { name: 'Dashboard', exact: true }).waitFor();
    await page.getByRole('img', { name: 'Located-vs-found error per cable type' }).waitFor();
    await e2e.screenshot(page, 'dashboard-supervisor-desktop');
    // The repair closed out above and the demo's HN-C2 repair wait for sign-off, not for a crew; the count says so
    // and opens the list on them.
    const fixed = (await Ticket.count({ where: { status: 'fixed' } })) as number;
    expect(fixed).toBeGreaterThanOrEqual(2);
    const waiting = page.getByTestId('awaiting-sign-off');
    expect(await waiting.textContent()).toBe(`${fixed} of them are fixed and waiting for sign-off — work for a supervisor, not a crew.`);
    await waiting.getByRole('link').click();
    await page.getByRole('heading', { name: 'Tickets', exact: true }).waitFor();
    expect(await page.getByLabel('Show').inputValue()).toBe('fixed');
    await page.close();
    const phone = await e2e.pageAs('supervisor@example.com', PHONE);
    await phone.goto(`${e2e.baseUrl}/dashboard`);
    await phone.getByRole('img', { name: 'Located-vs-found error per cable type' }).waitFor();
    // Nothing wider than the phone: no sideways scrolling.
    expect(await phone.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
    await e2e.screenshot(phone, 'dashboard-supervisor-phone');
    await phone.close();

    const admin = await e2e.pageAs('admin@example.com', DESKTOP);
    await admin.locator('aside').getByRole('link', { name: 'Outbox' }).click();
    const list = admin.getByTestId('outbox-list');
    await expect.poll(async () => (await list.textContent()) ?? '', { timeout: 10_000 }).toMatch(/assigned to you: Water in the cable on Feeder HN-3/);
    await e2e.screenshot(admin, 'outbox-admin-desktop');
    await admin.close();

    const adminPhone = await e2e.pageAs('admin@example.com', PHONE);
    await adminPhone.goto(`${e2e.baseUrl}/outbox`);
    // On a phone the formatted part opens first (it wraps to the screen); the plain text is one tap away.
    await adminPhone.getByRole('article', { name: 'Message' }).waitFor();
    expect(await adminPhone.getByTestId('outbox-body').count()).toBe(0);
    expect(await adminPhone.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
    await adminPhone.getByRole('button', { name: 'Plain text' }).click();
    await adminPhone.getByTestId('outbox-body').waitFor();
    expect(await adminPhone.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
    await e2e.screenshot(adminPhone, 'outbox-admin-phone');
    await adminPhone.close();
  });

  it('a supervisor reads what the crew found and did before the step that signs it off', async () => {
    // The demo's repair on Control pair HN-C2 is fixed and waits for sign-off.
    const page = await e2e.pageAs('supervisor@example.com', PHONE);
    await page.getByRole('link', { name: /Short circuit on Control pair HN-C2/ }).first().click();
    const signOff = page.getByRole('button', { name: 'Sign off…' });
    await signOff.waitFor();
    const summary = page.getByTestId('closeout-summary');
    expect(await summary.textContent()).toContain('Cut out the wet length and fitted a new straight joint');
    const summaryTop = (await summary.boundingBox())!.y;
    const signOffTop = (await signOff.boundingBox())!.y;
    expect(summaryTop).toBeLessThan(signOffTop);
    await e2e.screenshot(page, 'ticket-sign-off-phone');
    await page.close();
  });
});
