import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { type E2E, numberIn, PHONE, startE2E } from './support/browser';

let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

const number = numberIn;

describe('a new technician on the demo with no trace file of their own', () => {
  it('tries the upload with a sample from the upload page and reads the fault, not "already uploaded"', async () => {
    const page = await e2e.pageAs('tech2@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/upload`);
    await page.getByRole('heading', { name: 'No trace file to hand?' }).waitFor();
    await page.getByRole('button', { name: 'Try this sample oakhollow-data-link-short.csv', exact: true }).click();
    // The sample fills in where it was taken.
    await page.getByText('oakhollow-data-link-short.csv').first().waitFor();
    await expect
      .poll(() => page.getByLabel('Cable run').evaluate((el: HTMLSelectElement) => el.selectedOptions[0]?.textContent))
      .toBe('Data link OH-D1');
    expect(await page.getByLabel('Site').evaluate((el: HTMLSelectElement) => el.selectedOptions[0]?.textContent)).toBe(
      'Oakhollow cabinet row',
    );
    expect(await page.getByRole('button', { name: /End A/ }).getAttribute('aria-pressed')).toBe('true');
    // The file's size reads on one line beside its name on the phone, not its number over its unit.
    const size = page.getByTestId('upload-file-size');
    expect(await size.textContent()).toMatch(/^\d+ kB$/);
    const lines = await size.evaluate((el) => Math.round(el.getBoundingClientRect().height / parseFloat(getComputedStyle(el).lineHeight)));
    expect(lines).toBe(1);
    await e2e.screenshot(page, 'sample-upload-phone');
    await page.getByRole('button', { name: 'Upload and analyse' }).click();

    const distance = page.getByTestId('fault-distance');
    await distance.waitFor({ timeout: 20_000 });
    // scripts/make-demo-traces.ts put the short 57.3 m from end A, written with the run's library VF (0.675).
    expect(Math.abs(number(await distance.textContent()) - 57.3)).toBeLessThan(1.5);
    const traceUrl = new URL(page.url()).pathname;

    // Back on the upload page the tried sample links to its trace instead of offering an upload that would be a copy.
    await page.goto(`${e2e.baseUrl}/upload`);
    const tried = page.getByTestId('sample-traces').getByRole('link', { name: /^open trace \d+$/ });
    await tried.waitFor();
    expect(await tried.getAttribute('href')).toBe(traceUrl);
    expect(await page.getByRole('button', { name: 'Try this sample oakhollow-data-link-short.csv', exact: true }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Try this sample brookfold-telemetry-open.csv', exact: true }).count()).toBe(1);
  });

  it('opens the chart on the cable’s length and a little more, not the whole record, until Whole trace is asked for', async () => {
    const page = await e2e.pageAs('tech2@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/upload`);
    await page.getByRole('button', { name: 'Try this sample brookfold-telemetry-open.csv', exact: true }).click();
    await page.getByText('brookfold-telemetry-open.csv').first().waitFor();
    await page.getByRole('button', { name: 'Upload and analyse' }).click();
    await page.getByTestId('fault-distance').waitFor({ timeout: 20_000 });
    const note = page.getByTestId('chart-view-note');
    await note.waitFor();
    expect(await note.textContent()).toMatch(/^Showing the cable's [\d.,]+ k?m and a little more; the record runs to [\d.,]+ k?m\. Whole trace shows all of it\.$/);
    const xMax = () => page.locator('[data-x-max]').first().evaluate((el) => Number(el.getAttribute('data-x-max')));
    await expect.poll(xMax).toBeGreaterThan(0);
    const first = await xMax();
    await page.getByRole('button', { name: 'Whole trace' }).click();
    await expect.poll(xMax).toBeGreaterThan(first * 1.2);
    expect(await note.count()).toBe(0);
    await e2e.screenshot(page, 'chart-cable-length-phone');
    await page.close();
  });
});
