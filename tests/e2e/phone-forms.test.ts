import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { stepTraceCsv } from '../support/step-trace';
import { Ticket } from '../../server/db/models';
import { PHONE, startE2E, type E2E } from './support/browser';

/** Forms on a phone: what a sent form that cannot be taken, and the keyboard, do. */
let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

/** The focused element's accessible label (its <label>, else aria-label, else its text). */
const focused = (page: Page) =>
  page.evaluate(() => {
    const a = document.activeElement as HTMLElement & { labels?: NodeListOf<HTMLLabelElement> };
    return (a.labels?.[0]?.textContent ?? a.getAttribute('aria-label') ?? a.textContent ?? '').trim();
  });

describe('forms and long names on a phone', () => {
  it('takes the planner to the first field to fix when a new cable type is sent from the bottom of the form', async () => {
    const page = await e2e.pageAs('planner@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/cables/new`);
    await page.getByLabel('Velocity factor').fill('1.4');
    const send = page.getByRole('button', { name: 'Add to the library' });
    await send.scrollIntoViewIfNeeded();
    await send.click();
    await page.getByText('must be at most 1 (nothing is faster than light)').waitFor();
    await page.waitForFunction(() => document.activeElement?.getAttribute('aria-invalid') === 'true');
    expect(await focused(page)).toBe('Name');
    // In sight, below the bar at the top of the screen.
    const box = (await page.getByLabel('Name').boundingBox())!;
    const header = (await page.locator('header').first().boundingBox())!;
    expect(box.y).toBeGreaterThanOrEqual(header.y + header.height);
    expect(box.y + box.height).toBeLessThanOrEqual(PHONE.height);
  });

  it('goes from the file button straight to the instrument settings with the keyboard: the hidden file field is no stop of its own', async () => {
    const page = await e2e.pageAs('tech@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/upload`);
    await page.getByRole('button', { name: 'Choose trace files' }).focus();
    await page.keyboard.press('Tab');
    expect(await focused(page)).toBe('3. Instrument settings (optional)');
  });

  it('keeps a long file name with no spaces inside the width of the phone, on the upload form and on the trace it makes', async () => {
    const name = 'HN3_feeder_from_substation_bay3_2026-12-03_pulse_10ns_gain_x4_final_v2_reviewed.csv';
    const page = await e2e.pageAs('tech@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/upload`);
    await page.getByLabel('Site').selectOption({ label: 'Brookfold pumping station' });
    await page.getByLabel('Cable run').selectOption({ label: 'Radio mast feeder BF-R1' });
    await page.getByRole('button', { name: /End A/ }).click();
    await page
      .getByLabel('Trace files')
      .setInputFiles({ name, mimeType: 'text/csv', buffer: Buffer.from(stepTraceCsv({ faultM: 60, vf: 0.66, samples: 4000 })) });
    await page.getByRole('button', { name: `Remove ${name}` }).waitFor();
    const width = () => page.evaluate(() => document.documentElement.scrollWidth);
    expect(await width()).toBe(PHONE.width);
    const send = page.getByRole('button', { name: 'Upload and analyse' });
    expect((await send.boundingBox())!.width).toBeLessThan(PHONE.width);
    await send.click();
    await page.getByRole('heading', { level: 1, name }).waitFor();
    expect(await width()).toBe(PHONE.width);
    const title = (await page.getByRole('heading', { level: 1, name }).boundingBox())!;
    expect(title.x + title.width).toBeLessThanOrEqual(PHONE.width);
  });

  it('fits the close-out table of readings against the dig on a phone, its last column in sight', async () => {
    const ticket = (await Ticket.findOne({ where: { status: 'fixed' } }))!;
    const page = await e2e.pageAs('supervisor@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/tickets/${ticket.id}`);
    const table = page.getByTestId('method-scores');
    await table.waitFor();
    const [tableWidth, boxWidth] = await table.evaluate((el) => [el.scrollWidth, el.parentElement!.clientWidth]);
    expect(tableWidth).toBeLessThanOrEqual(boxWidth);
    const last = (await table.getByRole('columnheader', { name: 'In window' }).boundingBox())!;
    expect(last.x + last.width).toBeLessThanOrEqual(PHONE.width - 16);
    expect(await table.locator('tbody tr').first().locator('td').last().textContent()).toMatch(/^(yes|no)$/);
  });

  it("labels each person's role dropdown on the Users page with a visible word, wide enough for the longest role and a finger", async () => {
    const page = await e2e.pageAs('admin@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/admin/users`);
    const role = page.getByLabel('Role of Tomas Ekwueme');
    await role.waitFor();
    expect(await role.inputValue()).toBe('technician');
    const seen = await role.evaluate((el) => {
      const select = el as HTMLSelectElement;
      const label = select.labels[0];
      const word = label?.querySelector('span');
      const box = word?.getBoundingClientRect();
      const style = getComputedStyle(select);
      const ctx = document.createElement('canvas').getContext('2d')!;
      ctx.font = style.font;
      return {
        word: word?.textContent ?? null,
        wordBox: box ? { x: box.x, width: box.width, height: box.height } : null,
        // Room for the text: the box less its side padding (the right padding holds the arrow).
        room: select.clientWidth - parseFloat(style.paddingLeft) - parseFloat(style.paddingRight),
        longest: ctx.measureText('Field technician').width,
        height: select.getBoundingClientRect().height,
      };
    });
    expect(seen.word).toBe('Role');
    expect(seen.wordBox!.width).toBeGreaterThan(0);
    expect(seen.wordBox!.height).toBeGreaterThan(0);
    expect(seen.wordBox!.x).toBeGreaterThanOrEqual(0);
    expect(seen.wordBox!.x + seen.wordBox!.width).toBeLessThanOrEqual(PHONE.width);
    expect(seen.height).toBeGreaterThanOrEqual(44);
    expect(seen.room).toBeGreaterThanOrEqual(seen.longest);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBe(PHONE.width);
  });
});
