import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableRun, Finding, TicketFinding } from '../../server/db/models';
import { formatLengthRange } from '../../src/lib/format';
import { PHONE, startE2E, type E2E } from './support/browser';

let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

describe('a repair located by one TDR reading, on the crew’s phone', () => {
  it('gives the distance, window and place to dig once, under the headline, and says the reading behind it is that same one', async () => {
    const run = (await CableRun.findOne({ where: { name: 'Radio mast feeder BF-R1' } }))!;
    const finding = (await Finding.findOne({ where: { cableRunId: run.id, status: 'confirmed' } }))!;
    const ticketId = (await TicketFinding.findOne({ where: { findingId: finding.id } }))!.ticketId;
    const page = await e2e.pageAs('tech@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/tickets/${ticketId}`);

    // The headline: the reading's own window (one window per reading), from end A where it was taken.
    const window = formatLengthRange(finding.windowStartM, finding.windowEndM, 'm');
    expect(finding.distanceFromAM).toBe(finding.distanceM);
    expect(await page.getByTestId('best-window').textContent()).toContain(window);
    expect(await page.getByTestId('best-verdict').textContent()).toBe('One reading only: nothing to compare it with.');

    // Under it, one line instead of the same figures again.
    expect(await page.getByRole('heading', { name: 'The TDR reading behind it', exact: true }).count()).toBe(1);
    const alone = page.getByTestId('reading-alone');
    expect(await alone.textContent()).toBe('The best location above is this reading alone: the same distance, window and place to dig.');
    expect(await page.locator('main').textContent()).not.toContain('Cable-length window of this reading alone');
    const shown = await page.locator('main').evaluate((el, w) => el.textContent!.split(w).length - 1, window);
    expect(shown).toBe(1);
    await e2e.screenshot(page, 'single-reading-ticket-phone');
  });
});
