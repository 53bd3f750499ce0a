import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Finding } from '../../server/db/models';
import { PHONE, startE2E, type E2E } from './support/browser';

let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

describe('searching the findings list on a phone', () => {
  it('keeps the search in the address, says when nothing matches, and goes back to the earlier search', async () => {
    // The demo's confirmed findings whose route words name the feeder's splice SP-1.
    const confirmed = await Finding.findAll({ where: { status: 'confirmed' } });
    const atSplice = confirmed.filter((f) => /SP-1/i.test(f.routePositionText ?? '') || /SP-1/i.test(f.note ?? ''));
    expect(atSplice.length).toBeGreaterThan(0);
    expect(atSplice.length).toBeLessThan(confirmed.length);

    const page = await e2e.pageAs('tech@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/findings`);
    const box = page.getByRole('searchbox', { name: 'Search findings' });
    await box.waitFor();
    // A gloved thumb's target: at least 44 px tall, as every control.
    expect((await box.boundingBox())!.height).toBeGreaterThanOrEqual(44);

    await box.fill('sp-1');
    await page.waitForURL(/\?q=sp-1$/);
    const rows = page.getByTestId('finding-route');
    await expect.poll(() => rows.count()).toBe(atSplice.length);
    for (const text of await rows.allTextContents()) expect(text).toMatch(/SP-1/);
    await e2e.screenshot(page, 'findings-search-phone');

    await box.fill('no such place');
    await page.getByText('No findings match “no such place”').waitFor();
    const clear = page.getByRole('button', { name: 'Clear the search' });
    expect((await clear.boundingBox())!.height).toBeGreaterThanOrEqual(44);

    await page.goBack();
    await page.waitForURL(/\?q=sp-1$/);
    expect(await box.inputValue()).toBe('sp-1');
    await clear.click();
    await page.waitForURL((url) => url.search === '');
    expect(await box.inputValue()).toBe('');
    await page.close();
  });
});
