import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Locator, Page } from 'playwright-core';
import { CableRun, Finding, TicketFinding, Trace } from '../../server/db/models';
import { PHONE, startE2E, type E2E } from './support/browser';

/**
 * The trade's terms on a phone: each one a tap away from a short meaning in
 * plain words, which opens inside the screen and closes when another opens.
 */
let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

/** The explanation box lies wholly inside the phone's width. */
async function insideScreen(page: Page, note: Locator) {
  const box = (await note.boundingBox())!;
  const width = await page.evaluate(() => document.documentElement.clientWidth);
  expect(width).toBe(PHONE.width);
  expect(box.x).toBeGreaterThanOrEqual(8);
  expect(box.x + box.width).toBeLessThanOrEqual(width - 8 + 0.5);
}

describe('terms explained where they appear', () => {
  it('explains ρ beside the event and the blind zone and Z0 in the analysis, on a phone', async () => {
    const trace = (await Trace.findOne({ where: { originalName: 'coax-feeder-open.csv' } }))!;
    const page = await e2e.pageAs('tech@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/traces/${trace.id}`);

    const reading = page.getByTestId('event-reading');
    // The reading's words are unchanged by the term in it, and name the reflection coefficient in words, not by its symbol.
    expect(await reading.textContent()).toMatch(/^Reflection coefficient \+0\.9\d\d · round-trip \d+\.\d ns$/);
    // The event's title too: the open's kind and its reflection, no Greek letter a crew has to know.
    const title = (await page.getByRole('heading', { name: /^Event \d+: / }).first().textContent())!;
    expect(title).toMatch(/^Event \d+: Open · reflection \+0\.9\d/);
    expect(title).not.toContain('ρ');
    const rho = reading.getByRole('button', { name: 'Reflection coefficient', exact: true });
    expect(await rho.getAttribute('aria-expanded')).toBe('false');
    await rho.click();
    const rhoNote = page.getByRole('note', { name: 'ρ, the reflection coefficient' });
    expect(await rhoNote.textContent()).toContain('Near +1 is an open');
    await insideScreen(page, rhoNote);

    // The blind zone sits in the narrow left column of the analysis: its meaning still fits the screen.
    const blind = page.getByRole('button', { name: 'Blind zone', exact: true });
    await blind.click();
    expect(await rhoNote.count()).toBe(0);
    const blindNote = page.getByRole('note', { name: 'Blind zone' });
    expect(await blindNote.textContent()).toContain('A fault inside it cannot be seen from this end');
    await insideScreen(page, blindNote);

    await page.getByRole('button', { name: 'Z0', exact: true }).click();
    const z0Note = page.getByRole('note', { name: 'Z0, the characteristic impedance' });
    expect(await z0Note.textContent()).toContain('typically 50 or 75 Ω for coax');
    await insideScreen(page, z0Note);
    await page.keyboard.press('Escape');
    expect(await z0Note.count()).toBe(0);
  });

  it('says in plain words that the readings agree on the three-reading ticket, explains the 95 % window and the standard uncertainty there, and χ² beside the readings on the finding', async () => {
    const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
    const finding = (await Finding.findOne({ where: { cableRunId: run.id, status: 'confirmed' }, order: [['id', 'ASC']] }))!;
    const ticketId = (await TicketFinding.findOne({ where: { findingId: finding.id } }))!.ticketId;
    const page = await e2e.pageAs('supervisor@example.com', PHONE);

    // The finding's readings carry the agreement test's figures, χ² a tap away from its meaning.
    await page.goto(`${e2e.baseUrl}/findings/${finding.id}`);
    const agreement = page.getByTestId('agreement-test');
    expect(await agreement.textContent()).toMatch(/^Agreement test: χ² = \d+\.\d\d on 1 degree of freedom \(95 % limit 3\.84\)/);
    await agreement.getByRole('button', { name: 'χ²' }).click();
    const chi = page.getByRole('note', { name: 'χ², the agreement test' });
    expect(await chi.textContent()).toContain('Above it at least one is probably wrong');
    await insideScreen(page, chi);

    // The ticket the crew digs by says it in plain words, without the test's figures.
    await page.goto(`${e2e.baseUrl}/tickets/${ticketId}`);
    expect(await page.getByTestId('best-verdict').textContent()).toBe('The 2 readings agree.');
    expect(await page.getByTestId('best-location').textContent()).not.toMatch(/χ²|degree of freedom/);

    const window = page.getByTestId('best-window');
    await window.getByRole('button', { name: '95 % window' }).click();
    const windowNote = page.getByRole('note', { name: 'The 95 % window' });
    expect(await windowNote.textContent()).toContain('expose the whole window');
    await insideScreen(page, windowNote);
    // It lies over the line's next term: a tap on it puts it away.
    await windowNote.click();
    expect(await windowNote.count()).toBe(0);
    await window.getByRole('button', { name: 'standard uncertainty' }).click();
    const su = page.getByRole('note', { name: 'Standard uncertainty' });
    expect(await su.textContent()).toContain('one standard deviation');
    await insideScreen(page, su);
  });
});
