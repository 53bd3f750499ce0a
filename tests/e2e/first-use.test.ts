import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { DESKTOP, PHONE, startE2E, type E2E } from './support/browser';

/** What someone new to Rholog meets first: the sign-in page, the upload form, and a phone with no signal. */
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

const TRACE = 'time_ns,voltage_V\n0,0.5\n1,0.5\n2,0.5\n';

describe('the first screens', () => {
  it('puts the sign-in form in the page’s main landmark', async () => {
    const page = await e2e.newPage(PHONE);
    await page.goto(`${e2e.baseUrl}/sign-in`);
    await page.getByRole('main').getByRole('form', { name: 'Sign in' }).waitFor();
    expect(await page.getByRole('main').count()).toBe(1);
    await page.close();
  });

  it('says under the grey upload button what is still needed, until nothing is', async () => {
    const page = await e2e.pageAs('tech2@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/upload`);
    const button = page.getByRole('button', { name: 'Upload and analyse' });
    const missing = page.getByTestId('upload-missing');
    await missing.waitFor();
    expect(await button.isDisabled()).toBe(true);
    expect(await missing.textContent()).toBe('Still needed: the site and cable run, the end the instrument is connected at and a trace file.');
    // A screen reader reads the same words with the button.
    expect(await button.getAttribute('aria-describedby')).toBe('upload-missing');

    await page.getByLabel('Site').selectOption({ label: 'Oakhollow cabinet row' });
    await page.getByLabel('Cable run').selectOption({ label: 'Data link OH-D1' });
    expect(await missing.textContent()).toBe('Still needed: the end the instrument is connected at and a trace file.');
    await page.getByRole('button', { name: /End B/ }).click();
    expect(await missing.textContent()).toBe('Still needed: a trace file.');
    await page.getByLabel('Trace files').setInputFiles({ name: 'oh-d1-first.csv', mimeType: 'text/csv', buffer: Buffer.from(TRACE) });
    await page.getByText('oh-d1-first.csv').waitFor();
    expect(await missing.count()).toBe(0);
    expect(await button.isDisabled()).toBe(false);
    expect(await button.getAttribute('aria-describedby')).toBeNull();
    await e2e.screenshot(page, 'first-use-upload-ready-phone');
    await page.close();
  });

  it('lets a keyboard skip the navigation: the first Tab offers the page itself', async () => {
    const page = await e2e.pageAs('tech2@example.com', DESKTOP);
    await page.goto(`${e2e.baseUrl}/upload`);
    await page.getByLabel('Site').waitFor();
    await page.keyboard.press('Tab');
    const focused = () => page.evaluate(() => ({ id: document.activeElement?.id ?? '', text: document.activeElement?.textContent?.trim() ?? '' }));
    expect((await focused()).text).toBe('Skip to the page');
    expect(await page.getByTestId('skip-to-page').isVisible()).toBe(true);
    await page.keyboard.press('Enter');
    expect((await focused()).id).toBe('page');
    // The next Tab is inside the page, not in the navigation.
    await page.keyboard.press('Tab');
    expect(await page.evaluate(() => !!document.activeElement?.closest('main') && !document.activeElement?.closest('nav'))).toBe(true);
    await page.close();
  });

  it('sends a technician with no signal to the analysis on the phone, from the start page and from the upload page', async () => {
    const page = await e2e.pageAs('tech@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/device`);
    await page.getByTestId('field-data-age').waitFor();
    await page.evaluate(async () => (await navigator.serviceWorker.ready).active?.state);

    const start = page.getByTestId('home-upload');
    await page.goto(`${e2e.baseUrl}/`);
    expect(await start.textContent()).toBe('Upload a trace from site');
    expect(await start.getAttribute('href')).toBe('/upload');

    await e2e.context.setOffline(true);
    await page.reload();
    await page.getByTestId('connection-state').getByText('Offline').waitFor();
    expect(await start.textContent()).toBe('Analyse a trace on this phone');
    expect(await start.getAttribute('href')).toBe('/device/analyse');
    // The repairs list that cannot load is the one saved on the phone, said calmly, with no failure notice on the page.
    expect(await page.getByTestId('repairs-saved').textContent()).toMatch(/^No signal: as saved on this phone .+ ago, with where to dig\.$/);
    expect(await page.getByText('That did not work').count()).toBe(0);
    await e2e.screenshot(page, 'first-use-offline-home-phone');

    await page.getByRole('link', { name: 'Upload trace' }).first().click();
    const notice = page.getByTestId('upload-offline');
    await notice.waitFor();
    expect(await notice.textContent()).toMatch(/^No signal: this page needs the server/);
    await e2e.screenshot(page, 'first-use-offline-upload-phone');
    await notice.getByRole('link', { name: 'Analyse the trace on this phone' }).click();
    await page.getByRole('heading', { name: 'Analyse on this phone' }).waitFor();

    // With the signal back, the start page's button uploads again.
    await e2e.context.setOffline(false);
    await page.goto(`${e2e.baseUrl}/`);
    await page.getByTestId('connection-state').getByText('Online').waitFor();
    expect(await start.textContent()).toBe('Upload a trace from site');
    await page.close();
  });
});
