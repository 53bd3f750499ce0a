import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { PHONE, startE2E, type E2E } from './support/browser';

/** A technician's repair, opened again on the phone where there is no signal (the app reloaded, the tab evicted). */
let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterEach(async () => {
  await e2e?.context.setOffline(false);
});
afterAll(async () => {
  await e2e?.stop();
});

/** The service worker is active and its precache complete: the app can start with no network. */
async function offlineReady(page: Page) {
  await page.evaluate(async () => (await navigator.serviceWorker.ready).active?.state);
}

const REPAIR = 'Open conductor on Radio mast feeder BF-R1';

describe('a repair ticket without signal', () => {
  it('is still listed on the start page and opens with where to dig, read-only and saying so, and comes back to life with the signal', async () => {
    const page = await e2e.pageAs('tech@example.com', PHONE);

    // Online: the ticket as the server gives it, and the field data saved on the phone.
    await page.getByRole('link', { name: new RegExp(REPAIR) }).click();
    await page.getByTestId('best-distance').waitFor();
    const distance = await page.getByTestId('best-distance').textContent();
    const window95 = await page.getByTestId('best-window').textContent();
    const where = await page.getByTestId('best-route-position').textContent();
    expect(distance).toMatch(/^\d+\.\d m$/);
    await page.goto(`${e2e.baseUrl}/device`);
    await page.getByTestId('field-data-age').waitFor();
    await offlineReady(page);

    await e2e.context.setOffline(true);
    await page.goto(`${e2e.baseUrl}/`);
    await page.getByTestId('connection-state').getByText('Offline').waitFor();
    const saved = page.getByTestId('repairs-saved');
    await saved.waitFor();
    expect(await saved.textContent()).toMatch(/^No signal: as saved on this phone .+ ago, with where to dig\.$/);
    expect(await page.getByTestId('repairs-offline').count()).toBe(0);
    await e2e.screenshot(page, 'offline-repairs-home-phone');

    await page.getByRole('link', { name: new RegExp(REPAIR) }).click();
    await page.getByTestId('ticket-saved-copy').waitFor();
    expect(await page.getByRole('heading', { name: `Ticket 2: ${REPAIR}` }).isVisible()).toBe(true);
    expect(await page.getByTestId('ticket-saved-copy').textContent()).toMatch(
      /^Saved .+ ago \(.+\), with where to dig, access and notes as they were then\. A step, a comment or the close-out needs the signal: this page offers them again when it is back\.$/,
    );
    // Where to dig, as the server gave it, with the caution before digging.
    expect(await page.getByTestId('best-distance').textContent()).toBe(distance);
    expect(await page.getByTestId('best-window').textContent()).toBe(window95);
    expect(await page.getByTestId('best-route-position').textContent()).toBe(where);
    expect(await page.getByTestId('dig-caution').first().isVisible()).toBe(true);
    expect(await page.getByText(/^Access: Gate padlock 4471/).isVisible()).toBe(true);
    // Nothing to press that cannot work here, and no failure notice.
    expect(await page.getByRole('button', { name: 'Record the repair' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Add comment' }).count()).toBe(0);
    expect(await page.getByText('That did not work').count()).toBe(0);
    // The finding is named but not linked: its own page is not kept on the phone.
    expect(await page.getByTestId('ticket-finding-saved').allTextContents()).toEqual(['Finding 1 (its page opens with signal)']);
    expect(await page.getByRole('link', { name: /^(Open )?finding \d+$/i }).count()).toBe(0);
    await e2e.screenshot(page, 'offline-repairs-ticket-phone');

    // The signal is back: the server's ticket replaces the saved one, with its steps and close-out.
    await e2e.context.setOffline(false);
    await page.getByRole('button', { name: 'Record the repair' }).waitFor({ timeout: 20_000 });
    expect(await page.getByTestId('ticket-saved-copy').count()).toBe(0);
    expect(await page.getByTestId('best-distance').textContent()).toBe(distance);
    expect(await page.getByRole('link', { name: 'Open finding 1', exact: true }).getAttribute('href')).toBe('/findings/1');
    expect(await page.getByTestId('ticket-finding-saved').count()).toBe(0);
    await page.close();
  });
});
