import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bestLocationFor } from '../../server/findings/best-location';
import { CableRun, Finding, Measurement, RouteMarker, TicketFinding, Trace, User } from '../../server/db/models';
import type { BestLocationView } from '../../shared/schemas/measurements';
import { formatLength, formatLengthRange } from '../../shared/units/format-length';
import fs from 'node:fs';
import path from 'node:path';
import type { Locator } from 'playwright-core';
import { DESKTOP, PHONE, SCREENSHOT_DIR, startE2E, type E2E } from './support/browser';

/** One part of a page at full size, to look at closely. */
const shoot = (part: Locator, name: string) => part.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}.png`) });

/**
 * The demo's Feeder HN-3 fault, located three ways: a trace from end A, one
 * from end B and a Murray loop reading (server/db/demo/locate.ts), on one
 * repair ticket assigned to the second technician.
 */
let e2e: E2E;
let findingA: number;
let ticketId: number;
let best: BestLocationView;

beforeAll(async () => {
  e2e = await startE2E();
  const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
  const findings = await Finding.findAll({ where: { cableRunId: run.id, status: 'confirmed' }, order: [['id', 'ASC']] });
  const traces = await Trace.findAll({ where: { id: findings.map((f) => f.traceId) } });
  findingA = findings.find((f) => traces.find((t) => t.id === f.traceId)!.end === 'A')!.id;
  ticketId = (await TicketFinding.findOne({ where: { findingId: findingA } }))!.ticketId;
  best = (await bestLocationFor(findingA))!;
});
afterAll(async () => {
  await e2e?.stop();
});

describe('the best location in the browser', () => {
  it('leads the finding page with the fused location, its window and the readings behind it', async () => {
    const page = await e2e.pageAs('supervisor@example.com', DESKTOP);
    await page.goto(`${e2e.baseUrl}/findings/${findingA}`);
    const headline = page.getByTestId('best-distance');
    await headline.waitFor();
    // The fault the simulator put 612 m from end A (scripts/make-demo-traces.ts), read by two traces and a bridge.
    expect(best.distanceFromAM!).toBeGreaterThan(600);
    expect(best.distanceFromAM!).toBeLessThan(624);
    expect(await headline.textContent()).toBe(formatLength(best.distanceFromAM, 'm'));
    const win = await page.getByTestId('best-window').textContent();
    expect(win).toContain(formatLengthRange(best.windowStartM!, best.windowEndM!, 'm'));
    expect(win).toContain(`± ${formatLength(best.standardUncertaintyM, 'm')}`);
    const from = await page.getByTestId('best-methods').textContent();
    expect(from).toMatch(/TDR from both ends \(findings \d+ and \d+\), \d+ %/);
    expect(from).toMatch(/Murray loop from end A \(reading \d+\), \d+ %/);
    expect(await page.getByTestId('best-verdict').textContent()).toMatch(/^The 2 readings agree/);
    expect(await page.getByTestId('best-route-position').textContent()).toMatch(/SP-1/);
    // Every reading in the table, the single-ended ones shown but counted through the two-ended one.
    const rows = page.getByTestId('location-methods').locator('tbody tr');
    expect(await rows.count()).toBe(4);
    expect(await page.getByTestId('location-methods').textContent()).toContain('counted through the two-ended reading');
    // The finding is on the demo's repair ticket: a link to it, and no offer to raise another.
    const onTicket = page.getByTestId('finding-ticket-link');
    expect(await onTicket.count()).toBe(1);
    expect(await onTicket.textContent()).toMatch(new RegExp(`^On repair ticket ${ticketId} \\(`));
    expect(await onTicket.getAttribute('href')).toBe(`/tickets/${ticketId}`);
    expect(await page.getByRole('link', { name: 'Raise a repair ticket' }).count()).toBe(0);
    // The finding's own reading comes after, every line of it labelled as this reading alone: one window to dig by.
    const alone = page.getByTestId('reading-alone');
    expect(await alone.count()).toBe(1);
    expect(await alone.textContent()).toMatch(/^This reading alone \(dig by the best location above\)/);
    expect(await alone.textContent()).toContain('Cable-length window of this reading alone');
    expect(await alone.textContent()).toContain('Along the route, this reading alone:');
    expect(await page.getByRole('heading', { name: 'This TDR reading alone' }).count()).toBe(1);
    await page.getByTestId('route-strip').locator('svg').waitFor();
    expect(await page.getByTestId('ground-note').textContent()).toMatch(/No route marker of this run has coordinates/);
    // The safety caution beside the page keeps its own height instead of stretching down the long column.
    const caution = (await page.getByRole('note', { name: 'Safety caution' }).boundingBox())!;
    const column = (await page.getByTestId('best-location').boundingBox())!;
    expect(caution.height).toBeLessThan(400);
    expect(caution.height).toBeLessThan(column.height);
    await e2e.screenshot(page, 'best-location-finding-desktop');
    await shoot(page.getByTestId('best-location'), 'best-location-headline-desktop');
    // The trace the finding came from leads with the same location.
    const traceId = (await Finding.findByPk(findingA))!.traceId;
    await page.goto(`${e2e.baseUrl}/traces/${traceId}`);
    await page.getByTestId('best-distance').waitFor();
    expect(await page.getByTestId('best-distance').textContent()).toBe(formatLength(best.distanceFromAM, 'm'));
    await e2e.screenshot(page, 'best-location-trace-desktop');
    // The demo's closed-out repair scored its reading against the find: the dashboard lists it per method.
    await page.goto(`${e2e.baseUrl}/dashboard`);
    const table = page.getByTestId('method-accuracy');
    await table.waitFor();
    expect(await table.locator('tbody tr').first().textContent()).toMatch(/^Best location \(all readings\)1/);
    await shoot(table, 'best-location-method-accuracy-desktop');
    // On a phone the same rows are stacked blocks, and nothing on the dashboard is wider than the screen.
    await page.setViewportSize(PHONE);
    await page.reload();
    const list = page.getByTestId('method-accuracy-list');
    await list.waitFor();
    expect(await list.locator('li').first().textContent()).toMatch(/^Best location \(all readings\)Repairs1/);
    expect(await table.isVisible()).toBe(false);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
    await shoot(list, 'best-location-method-accuracy-phone');
    await page.close();
  });

  it('says the best location is being worked out while it is, pointing at no headline and showing no other distance to dig by', async () => {
    const finding = (await Finding.findByPk(findingA))!;
    const page = await e2e.pageAs('supervisor@example.com', DESKTOP);
    // The cable run the headline needs is held back until the page has been read.
    let release!: () => void;
    const held = new Promise<void>((resolve) => (release = resolve));
    await page.route(new RegExp(`/api/cable-runs/${finding.cableRunId}$`), async (route) => {
      await held;
      await route.continue();
    });
    await page.goto(`${e2e.baseUrl}/findings/${findingA}`);
    const alone = page.getByTestId('reading-alone');
    await alone.waitFor();
    expect(await page.getByRole('status').filter({ hasText: 'Working out the best location to dig' }).count()).toBe(1);
    expect(await alone.locator('p').first().textContent()).toBe('This reading alone (the best location to dig by is being worked out)');
    expect(await page.locator('main').textContent()).not.toContain('dig by the best location above');
    expect(await page.getByTestId('fault-distance').count()).toBe(0);
    expect(await page.getByTestId('best-distance').count()).toBe(0);
    release();
    await page.getByTestId('best-distance').waitFor();
    expect(await page.getByTestId('best-distance').textContent()).toBe(formatLength(best.distanceFromAM, 'm'));
    expect(await alone.locator('p').first().textContent()).toBe('This reading alone (dig by the best location above)');
    expect(await page.getByText('Working out the best location to dig').count()).toBe(0);
    await page.close();
  });

  it('lets a technician record a bridge reading on a phone, with the safety caution, and withdraw it', async () => {
    const page = await e2e.pageAs('tech@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/findings/${findingA}`);
    await page.getByTestId('best-distance').waitFor();
    // No text of the route strips runs into another on a 390 px phone: marker names, lengths, "best location".
    await page.getByTestId('route-strip').locator('svg').waitFor();
    const clashes = await page.evaluate(() => {
      const out: string[] = [];
      for (const svg of document.querySelectorAll('[data-testid^="route-strip"] svg')) {
        const texts = [...svg.querySelectorAll('text')].map((t) => ({ text: t.textContent ?? '', box: t.getBoundingClientRect() }));
        const lines = [...svg.querySelectorAll('line')].filter((l) => l.getAttribute('stroke-width') === '1').map((l) => l.getBoundingClientRect());
        texts.forEach((a, i) => {
          texts.slice(i + 1).forEach((b) => {
            if (a.box.left < b.box.right && b.box.left < a.box.right && a.box.top < b.box.bottom && b.box.top < a.box.bottom) out.push(`${a.text} / ${b.text}`);
          });
          // A leader line drawn through a label's letters (its ends may touch the label it leads to).
          for (const l of lines) {
            const inside = l.left > a.box.left + 1 && l.right < a.box.right - 1 && l.top < a.box.bottom - 3 && l.bottom > a.box.top + 3 && l.top < a.box.top;
            if (inside) out.push(`leader through ${a.text}`);
          }
        });
      }
      return out;
    });
    expect(clashes).toEqual([]);
    // Each strip says both of its end lengths: under its ends, or in the line below it when the best-location label took the room.
    const missingEnds = await page.evaluate(() => {
      const out: string[] = [];
      for (const fig of document.querySelectorAll('figure[data-testid^="route-strip"]')) {
        const svg = fig.querySelector('svg')!;
        const m = /route from (.+) to (.+) along the ground/.exec(svg.getAttribute('aria-label') ?? '');
        if (!m) continue;
        const said = [...svg.querySelectorAll('text')].map((t) => t.textContent).join(' | ') + ' | ' + (fig.querySelector('p')?.textContent ?? '');
        for (const len of [m[1], m[2]]) if (!said.includes(len)) out.push(`${fig.getAttribute('data-testid')}: ${len}`);
      }
      return out;
    });
    expect(missingEnds).toEqual([]);
    // On a phone the page's full safety caution comes screens later: a short one stands right under the place to dig.
    const dig = page.getByTestId('dig-caution');
    expect(await dig.textContent()).toMatch(/^Before anyone digs or climbs: cable de-energised, locked out and proven dead/);
    const digBox = (await dig.boundingBox())!;
    const placeBox = (await page.getByTestId('best-route-position').boundingBox())!;
    expect(digBox.y).toBeGreaterThan(placeBox.y);
    expect(digBox.y - placeBox.y).toBeLessThan(200);
    await e2e.screenshot(page, 'best-location-finding-phone');
    await shoot(page.getByTestId('best-location'), 'best-location-headline-phone');
    await shoot(page.getByTestId('location-methods-list'), 'best-location-methods-phone');
    await page.getByRole('button', { name: 'Record a bridge, capacitance or resistance reading' }).click();
    const form = page.getByRole('form', { name: 'Record a reading' });
    await form.waitFor();
    expect(await page.getByRole('note', { name: 'Safety caution' }).count()).toBeGreaterThanOrEqual(2);
    await form.getByLabel('Method').selectOption('murray');
    const ratio = form.getByLabel('Ratio at balance, Q/(P+Q)');
    // A ratio past the loop's end first: refused under its own field, nothing stored.
    await ratio.fill('1.2');
    await form.getByLabel('Material').selectOption('aluminium');
    await form.getByLabel('Size (mm²)').selectOption('185');
    await form.getByLabel('Conductor temperature (°C)').fill('9');
    await form.getByLabel('Instrument').fill('Loop bridge LB-3, serial 0117');
    await form.getByRole('button', { name: 'Record the reading' }).click();
    // The answer comes from the server: wait for it as long as a busy machine may need, not a fixed second.
    await expect.poll(() => ratio.getAttribute('aria-invalid'), { timeout: 20_000 }).toBe('true');
    expect(await form.textContent()).toMatch(/between 0 and 1/);
    expect(await Measurement.count({ where: { findingId: findingA } })).toBe(1);
    await ratio.fill('0.341');
    await shoot(form, 'best-location-reading-form-phone');
    await form.getByRole('button', { name: 'Record the reading' }).click();
    const item = page.getByTestId('measurement').filter({ hasText: 'in use' }).filter({ hasText: '613.8 m' });
    // 0.341 of a loop of two equal 900 m cores: 0.341 × 1800 = 613.8 m from end A (hand-worked).
    await item.waitFor();
    expect(await Measurement.count({ where: { findingId: findingA, status: 'active' } })).toBe(2);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
    await item.getByRole('button', { name: 'Withdraw' }).click();
    await item.getByLabel('Why it is withdrawn').fill('Entered to try the form');
    await item.getByRole('button', { name: 'Withdraw the reading' }).click();
    await page.getByTestId('measurement').filter({ hasText: 'withdrawn' }).filter({ hasText: 'Entered to try the form' }).waitFor();
    expect(await Measurement.count({ where: { findingId: findingA, status: 'active' } })).toBe(1);
    // Back to the demo's own readings: the headline as before.
    await page.getByText(formatLength(best.distanceFromAM, 'm'), { exact: true }).first().waitFor();
    await page.close();
  });

  it('prints the crew sheet with the fused location in the crew’s unit, feet included', async () => {
    await User.update({ unitPreference: 'ft' }, { where: { email: 'tech2@example.com' } });
    const page = await e2e.pageAs('tech2@example.com', PHONE);
    // The ticket leads with the same location.
    await page.goto(`${e2e.baseUrl}/tickets/${ticketId}`);
    await page.getByTestId('best-distance').waitFor();
    expect(await page.getByTestId('best-distance').textContent()).toBe(formatLength(best.distanceFromAM, 'ft'));
    expect(await page.getByTestId('ticket-distance').count()).toBe(2);
    // Each reading under it is labelled as that reading alone.
    expect(await page.getByTestId('reading-alone').count()).toBe(2);
    expect(await page.getByTestId('reading-alone').first().textContent()).toContain('Cable-length window of this reading alone');
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);
    await e2e.screenshot(page, 'best-location-ticket-phone-feet');
    await shoot(page.getByTestId('best-location'), 'best-location-ticket-headline-phone-feet');
    await page.goto(`${e2e.baseUrl}/tickets/${ticketId}/sheet`);
    const sheet = page.getByTestId('sheet-best-location');
    await sheet.getByTestId('best-distance').waitFor().catch(async (err: unknown) => {
      await e2e.screenshot(page, 'best-location-sheet-failed');
      throw err;
    });
    // 612 m is about 2008 ft (international foot, 0.3048 m exactly); four figures carry no decimals.
    const feet = formatLength(best.distanceFromAM, 'ft');
    expect(feet).toMatch(/^20\d\d ft$/);
    expect(await sheet.getByTestId('best-distance').textContent()).toBe(feet);
    expect(await sheet.getByTestId('best-window').textContent()).toContain(formatLengthRange(best.windowStartM!, best.windowEndM!, 'ft'));
    // Both findings of the fault share one best location: it is printed once.
    expect(await sheet.getByTestId('best-distance').count()).toBe(1);
    // The two readings' own windows are printed as theirs alone.
    expect(await page.getByTestId('sheet-reading-alone').count()).toBe(2);
    expect(await page.locator('dt', { hasText: 'Cable-length window, this reading alone' }).count()).toBe(2);
    expect(await sheet.textContent()).not.toMatch(/\d m\b/);
    await page.getByTestId('sheet-trace').first().locator('canvas').waitFor();
    await e2e.screenshot(page, 'best-location-sheet-phone-feet');
    await shoot(sheet, 'best-location-sheet-headline-phone-feet');
    await page.setViewportSize(DESKTOP);
    await page.emulateMedia({ media: 'print' });
    expect(await page.getByRole('note', { name: 'Safety caution' }).isVisible()).toBe(true);
    expect(await sheet.getByTestId('best-distance').isVisible()).toBe(true);
    expect(await page.getByTestId('geo-link').count()).toBe(0);
    await e2e.screenshot(page, 'best-location-sheet-print');
    await page.close();
  });

  it('places the location on the map once the markers carry coordinates, with a geo: link and a GPX file', async () => {
    const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
    const page = await e2e.pageAs('supervisor@example.com', DESKTOP);
    await page.goto(`${e2e.baseUrl}/sites/${run.siteId}/runs/${run.id}`);
    await page.getByRole('heading', { name: 'Route markers' }).waitFor();
    // Invented test coordinates on one meridian: RC-1 (chainage 455 m), SP-1 (600 m) and P-7 (760 m), spaced as the
    // route: 145 m = 0.001304° and 160 m = 0.001439° of a meridian (111 194.93 m per degree, hand-worked).
    const lat = page.getByLabel('Latitude (°, optional)');
    const lon = page.getByLabel('Longitude (°, optional)');
    const place = async (i: number, la: string, lo: string) => {
      await lat.nth(i).fill(la);
      await lon.nth(i).fill(lo);
    };
    await place(2, '-29.998696', '-15');
    await place(3, '-30', '-15');
    // First P-7 typed 0.1° off: 11 km from SP-1 for 160 m of route. Refused, naming the marker.
    await place(4, '-30.1', '-15');
    await page.getByRole('button', { name: 'Save markers' }).click();
    await page.getByText(/marker P-7 is 11\d\d\d m from SP-1 in a straight line but only 160\.0 m further along the route/).first().waitFor();
    await place(4, '-30.001439', '-15');
    await page.getByRole('button', { name: 'Save markers' }).click();
    await expect.poll(async () => (await RouteMarker.findOne({ where: { cableRunId: run.id, label: 'P-7' } }))?.latitude).toBe(-30.001439);
    // The editor stays on screen after the save and says it worked.
    await page.getByText(/^Markers saved\. New findings use them/).waitFor();
    expect(await page.getByText(/marker P-7 is 11\d\d\d m from SP-1/).count()).toBe(0);
    await lat.nth(4).waitFor();
    expect(await lat.nth(4).inputValue()).toBe('-30.001439');
    await e2e.screenshot(page, 'best-location-markers-desktop');

    await page.goto(`${e2e.baseUrl}/findings/${findingA}`);
    await page.getByTestId('ground').waitFor();
    const mapped = (await bestLocationFor(findingA))!;
    // The fault is in SP-1's slack coil: on the ground it is at SP-1 itself, −30°, −15° (hand-worked).
    expect(mapped.ground!.point.latitude).toBeCloseTo(-30, 9);
    expect(await page.getByTestId('ground-text').textContent()).toMatch(/^-30\.000000, -15\.000000, within \d+\.\d m \(at SP-1, estimated/);
    expect(await page.getByTestId('geo-link').getAttribute('href')).toBe(`geo:-30.000000,-15.000000;u=${Math.ceil(mapped.ground!.radiusM)}`);
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'GPX file' }).click()]);
    expect(download.suggestedFilename()).toBe(`finding-${findingA}-location.gpx`);
    const gpx = fs.readFileSync((await download.path())!, 'utf8');
    expect(gpx).toContain('<wpt lat="-30.000000" lon="-15.000000">');
    expect(gpx).toContain('<name>SP-1</name>');
    await shoot(page.getByTestId('best-location'), 'best-location-headline-mapped-desktop');
    await page.close();
  });
});
