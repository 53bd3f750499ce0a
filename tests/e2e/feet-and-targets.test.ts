import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableCalibration, CableRun, CableType, Finding, MailJob, Ticket, Trace, User } from '../../server/db/models';
import type { Role } from '../../shared/auth/permissions';
import { can } from '../../shared/auth/permissions';
import { stepTraceCsv } from '../support/step-trace';
import { DESKTOP, PHONE, signIn, startE2E, type E2E } from './support/browser';

/**
 * Every page, as each role sees it, with every account set to feet: no metre
 * figure anywhere on screen, every control tall enough for a gloved thumb on
 * a phone, and no warning from the router in the console.
 */

let e2e: E2E;
/** A confirmed finding whose dig window runs over road crossing RC-1 (see beforeAll). */
let crossing: { traceId: number; findingId: number; ticketId: number };
const ids = { site: 0, run: 0, trace: 0, finding: 0, ticket: 0, closedTicket: 0, cable: 0 };

const PEOPLE: Record<Role, string> = {
  technician: 'tech@example.com',
  supervisor: 'supervisor@example.com',
  planner: 'planner@example.com',
  admin: 'admin@example.com',
};

/**
 * A number followed by the metre symbol: "80 m", "12.5m". Not "mm", "min",
 * "m/s" or "m²", and not a number inside a name ("attenuation_db_per_100m").
 */
const METRE_FIGURE = /(?<![\w.])\d+(?:\.\d+)?\s?m(?![\w/²³])/;
/** The definition of the foot, which the calculator states beside its conversions: a constant, not a length. */
const FOOT_DEFINITION = /0\.3048 m exactly/;
/** Smallest control height on a phone: 44 CSS px (the look's rule for gloved hands), less half a pixel of rounding. */
const MIN_TARGET_PX = 43.5;

beforeAll(async () => {
  e2e = await startE2E();
  // Everyone works in feet, so e-mails written during the test are in feet too.
  await User.update({ unitPreference: 'ft' }, { where: {} });

  const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
  const vf = (await CableType.findByPk(run.cableTypeId))!.vf;
  const { agent, token } = await e2e.agentAs(PEOPLE.technician);
  // An open 462 m of cable from end A. Hand-worked: MH-1 (120 m, 4 m coiled) and MH-2 (310 m, 6 m) lie
  // before it, so it is 452 m along the route, 142 m past MH-2 and 3 m short of road crossing RC-1 at 455 m
  // (reached at 455 + 10 = 465 m of cable): any window wider than ±3 m runs over RC-1.
  const up = await agent
    .post('/api/traces')
    .set('x-csrf-token', token)
    .field('cableRunId', String(run.id))
    .field('end', 'A')
    .attach('file', Buffer.from(stepTraceCsv({ faultM: 462, vf, samples: 9000 })), 'hn3-near-rc1.csv')
    .expect(201);
  const trace = up.body.traces[0];
  const event = trace.analysis.events.reduce((best: { distanceM: number }, e: { distanceM: number }) => (Math.abs(e.distanceM - 462) < Math.abs(best.distanceM - 462) ? e : best));
  expect(event.windowStartM).toBeLessThan(465);
  expect(event.windowEndM).toBeGreaterThan(465);
  const f = await agent.post('/api/findings').set('x-csrf-token', token).send({ traceId: trace.id, eventIndex: event.index, status: 'confirmed', kind: 'sheath-damage' }).expect(201);
  const sup = await e2e.agentAs(PEOPLE.supervisor);
  const t = await sup.agent
    .post('/api/tickets')
    .set('x-csrf-token', sup.token)
    .send({ findingIds: [f.body.id], assigneeId: (await User.findOne({ where: { email: PEOPLE.technician } }))!.id, priority: 'urgent', dueDate: `${new Date().getUTCFullYear() + 1}-05-20` })
    .expect(201);
  crossing = { traceId: trace.id, findingId: f.body.id, ticketId: t.body.id };

  ids.site = run.siteId;
  ids.run = run.id;
  ids.trace = (await Trace.findOne({ where: { status: 'ok' }, order: [['id', 'ASC']] }))!.id;
  ids.finding = (await Finding.findOne({ where: { status: 'confirmed' }, order: [['id', 'ASC']] }))!.id;
  ids.ticket = (await Ticket.findOne({ where: { status: 'under-way' }, order: [['id', 'ASC']] }))!.id;
  ids.closedTicket = (await Ticket.findOne({ where: { status: 'fixed' }, order: [['id', 'ASC']] }))!.id;
  ids.cable = (await CableCalibration.findOne({ order: [['id', 'ASC']] }))?.cableTypeId ?? run.cableTypeId;
}, 300_000);
afterAll(async () => {
  await e2e?.stop();
});

/** The pages a role can open, with a name for the screenshots. */
function pagesFor(role: Role): Array<{ name: string; path: string; time?: boolean }> {
  const all: Array<{ name: string; path: string; need?: Parameters<typeof can>[1]; time?: boolean }> = [
    { name: 'home', path: '/' },
    { name: 'account', path: '/account' },
    { name: 'upload', path: '/upload', need: 'traces:upload' },
    { name: 'traces', path: '/traces', need: 'traces:read' },
    { name: 'trace', path: `/traces/${ids.trace}`, need: 'traces:read' },
    { name: 'trace-time', path: `/traces/${ids.trace}`, need: 'traces:read', time: true },
    { name: 'trace-crossing', path: `/traces/${crossing.traceId}`, need: 'traces:read' },
    { name: 'findings', path: '/findings', need: 'findings:read' },
    { name: 'finding', path: `/findings/${ids.finding}`, need: 'findings:read' },
    { name: 'finding-crossing', path: `/findings/${crossing.findingId}`, need: 'findings:read' },
    { name: 'tickets', path: '/tickets', need: 'tickets:read' },
    { name: 'ticket', path: `/tickets/${ids.ticket}`, need: 'tickets:read' },
    { name: 'ticket-closed', path: `/tickets/${ids.closedTicket}`, need: 'tickets:read' },
    { name: 'ticket-crossing', path: `/tickets/${crossing.ticketId}`, need: 'tickets:read' },
    { name: 'crew-sheet', path: `/tickets/${crossing.ticketId}/sheet`, need: 'tickets:read' },
    { name: 'dashboard', path: '/dashboard', need: 'dashboard:read' },
    { name: 'sites', path: '/sites', need: 'sites:read' },
    { name: 'site', path: `/sites/${ids.site}`, need: 'sites:read' },
    { name: 'site-run', path: `/sites/${ids.site}/runs/${ids.run}`, need: 'sites:read' },
    { name: 'cables', path: '/cables', need: 'cables:read' },
    { name: 'cable', path: `/cables/${ids.cable}`, need: 'cables:read' },
    { name: 'cable-new', path: '/cables/new', need: 'cables:write' },
    { name: 'calculator', path: '/cables/calculator', need: 'cables:read' },
    { name: 'cable-import', path: '/cables/import', need: 'cables:write' },
    { name: 'calibrations', path: '/calibrations', need: 'calibrations:review' },
    { name: 'users', path: '/admin/users', need: 'users:manage' },
    { name: 'outbox', path: '/outbox', need: 'outbox:own' },
  ];
  return all.filter((p) => !p.need || can(role, p.need));
}

/** Wait until the page has its heading and nothing on it is still loading. */
async function settle(page: Page) {
  await page.locator('main h1, article h1').first().waitFor({ timeout: 30_000 });
  await page.waitForLoadState('networkidle', { timeout: 15_000 }).catch(() => undefined);
  // The loading lines are status paragraphs ending in "…" ("Loading the trace…").
  await page.waitForFunction(() => ![...document.querySelectorAll('p[role="status"]')].some((p) => p.textContent?.trim().endsWith('…')), undefined, { timeout: 30_000 });
}

/**
 * What a person reads: the visible text, the values in the form fields and
 * the chosen options. An e-mail shown in the Outbox, its subject as well as its
 * body, is left out: it is a copy of what was sent to someone else, in their
 * unit (checked on its own below).
 */
async function readableText(page: Page): Promise<string> {
  return page.evaluate(() => {
    const skip = document.querySelectorAll('[data-testid="outbox-body"], [data-testid="outbox-subject"], iframe');
    skip.forEach((el) => ((el as HTMLElement).dataset.hiddenForScan = (el as HTMLElement).style.visibility || 'shown'));
    skip.forEach((el) => ((el as HTMLElement).style.visibility = 'hidden'));
    const text = [document.body.innerText];
    skip.forEach((el) => ((el as HTMLElement).style.visibility = (el as HTMLElement).dataset.hiddenForScan === 'shown' ? '' : (el as HTMLElement).dataset.hiddenForScan!));
    for (const el of document.querySelectorAll<HTMLInputElement | HTMLTextAreaElement>('input:not([type=hidden]):not([type=range]):not([type=checkbox]):not([type=radio]):not([type=file]), textarea')) {
      if (el.offsetParent !== null && el.value) text.push(el.value);
    }
    for (const el of document.querySelectorAll('select')) if (el.offsetParent !== null) text.push(el.selectedOptions[0]?.textContent ?? '');
    return text.join('\n');
  });
}

/** Every visible control shorter than 44 px, named so the failure says which. */
async function smallTargets(page: Page): Promise<string[]> {
  return page.evaluate((min) => {
    const out: string[] = [];
    const controls = document.querySelectorAll<HTMLElement>('a[href], button, input, select, textarea, summary, [role="button"], [role="tab"]');
    for (const el of controls) {
      if (el.closest('[aria-hidden="true"], dialog:not([open])')) continue;
      if (el instanceof HTMLInputElement && el.type === 'hidden') continue;
      const style = getComputedStyle(el);
      if (style.visibility === 'hidden' || style.display === 'none') continue;
      let box = el.getBoundingClientRect();
      // A visually hidden input is worked through its visible label or button.
      if (box.width <= 1 || box.height <= 1) continue;
      // A check box or radio is worked through its label: the label is the target.
      if (el instanceof HTMLInputElement && (el.type === 'checkbox' || el.type === 'radio')) box = (el.closest('label') ?? el).getBoundingClientRect();
      // A control whose touch area reaches past its text through an absolutely placed ::before (a term in running
      // text, whose lines it must not spread) is worked through that area: it counts as tall as it reaches.
      let height = box.height;
      const before = getComputedStyle(el, '::before');
      if (before.content !== 'none' && before.position === 'absolute') {
        const top = parseFloat(before.top);
        const bottom = parseFloat(before.bottom);
        if (Number.isFinite(top) && Number.isFinite(bottom)) height = Math.max(height, box.height - top - bottom);
      }
      if (height < min) out.push(`${el.tagName.toLowerCase()} "${(el.textContent || el.getAttribute('aria-label') || (el as HTMLInputElement).value || '').trim().slice(0, 40)}" ${height.toFixed(1)} px`);
    }
    return out;
  }, MIN_TARGET_PX);
}

async function visit(page: Page, path: string, time = false) {
  await page.goto(`${e2e.baseUrl}${path}`);
  await settle(page);
  if (time) {
    await page.getByRole('group', { name: 'Horizontal axis' }).getByRole('button', { name: 'Time' }).click();
    await page.getByTestId('cursor-1').filter({ hasText: 'ns' }).waitFor();
  }
}

describe('every page in feet, for every role', () => {
  for (const role of ['technician', 'supervisor', 'planner', 'admin'] as const) {
    for (const [size, viewport] of [
      ['phone', PHONE],
      ['desktop', DESKTOP],
    ] as const) {
      it(`shows ${role}s no metre figure${size === 'phone' ? ', and only controls at least 44 px tall' : ''} (${size})`, async () => {
        const page = await e2e.newPage(viewport);
        const warnings: string[] = [];
        page.on('console', (m) => {
          if (/HydrateFallback/.test(m.text())) warnings.push(m.text());
        });
        await signIn(page, e2e.baseUrl, PEOPLE[role]);
        await page.getByTestId('signed-in-name').first().waitFor({ state: 'attached' });
        const metres: string[] = [];
        const small: string[] = [];
        for (const p of pagesFor(role)) {
          await visit(page, p.path, p.time);
          const text = await readableText(page);
          for (const line of text.split('\n')) if (METRE_FIGURE.test(line.replace(FOOT_DEFINITION, ''))) metres.push(`${p.name}: ${line.trim().slice(0, 160)}`);
          if (size === 'phone') for (const s of await smallTargets(page)) small.push(`${p.name}: ${s}`);
          // One set of screenshots is enough to look at: the admin sees nearly every page, the technician the field ones.
          if (role === 'admin' || (role === 'technician' && ['home', 'upload', 'trace', 'trace-crossing', 'ticket-crossing', 'crew-sheet'].includes(p.name))) {
            await e2e.screenshot(page, `feet-${role}-${p.name}-${size}`);
          }
        }
        await page.close();
        expect({ metres, small, warnings }).toEqual({ metres: [], small: [], warnings: [] });
      }, 600_000);
    }
  }
});

describe('a dig window that runs over a marker', () => {
  it('is named with both markers on the trace, the finding, the ticket and the crew sheet, in feet', async () => {
    const page = await e2e.pageAs(PEOPLE.supervisor, PHONE);
    // Hand-worked (see beforeAll): 142 m past MH-2 is 465.9 ft; RC-1 lies 145 m = 475.7 ft past MH-2.
    const expected = /^The dig window crosses road crossing RC-1 \(475\.7 ft past MH-2\): the fault may be on either side of it\.$/;
    for (const path of [`/traces/${crossing.traceId}`, `/findings/${crossing.findingId}`, `/tickets/${crossing.ticketId}`, `/tickets/${crossing.ticketId}/sheet`]) {
      await visit(page, path);
      const warning = page.getByTestId('window-crossing').first();
      expect(await warning.textContent()).toMatch(expected);
      expect(await warning.isVisible()).toBe(true);
    }
    const where = await page.getByTestId('sheet-route-position').first().textContent();
    expect(where).toMatch(/^4\d\d\.\d ft past manhole MH-2 toward road crossing RC-1; dig on the ground \d+\.\d–\d+\.\d ft past MH-2$/);
    await page.close();
  });

  it('is named in the supervisor’s e-mail too, in feet', async () => {
    // The e-mail is queued once the finding is committed; the walks above have long given it time, but poll rather than assume.
    let mail: MailJob | null = null;
    for (let i = 0; i < 100 && !mail; i++) {
      mail = await MailJob.findOne({ where: { findingId: crossing.findingId, kind: 'finding-confirmed' } });
      if (!mail) await new Promise((resolve) => setTimeout(resolve, 100));
    }
    // Rows wrap at 76 characters with their value column kept: read each row as one line.
    const text = (mail?.text ?? '').replace(/\n {2,}/g, ' ');
    expect(text).toMatch(/The dig window crosses road crossing RC-1 \(475\.7 ft past MH-2\)/);
    expect(text).not.toMatch(METRE_FIGURE);
  });
});

describe('words and look', () => {
  it('counts one route marker as one, shows marker kinds in words, and saved marker values in ink, not placeholder grey', async () => {
    const page = await e2e.pageAs(PEOPLE.supervisor, DESKTOP);
    await visit(page, `/sites/${ids.site}/runs/${ids.run}`);
    const kind = page.getByLabel('Kind').first();
    expect(await kind.locator('option').allTextContents()).toContain('Road crossing');
    expect(await kind.locator('option').allTextContents()).not.toContain('road-crossing');
    const chainage = page.getByLabel(/^Chainage/).first();
    expect(await chainage.inputValue()).not.toBe('');
    // Ink is #1d2731 = rgb(29, 39, 49); the grey of a placeholder is mist #5a6874.
    expect(await chainage.evaluate((el) => getComputedStyle(el).color)).toBe('rgb(29, 39, 49)');
    // The demo's Data link OH-D1 has one marker, the duct pit.
    const one = (await CableRun.findOne({ where: { name: 'Data link OH-D1' } }))!;
    await visit(page, `/sites/${one.siteId}`);
    const row = page.getByRole('link', { name: /Data link OH-D1/ });
    expect(await row.textContent()).toMatch(/· 1 route marker$/);
    await page.close();
  });
});
