import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableRun, CableType, Finding } from '../../server/db/models';
import { stepTraceCsv } from '../support/step-trace';
import { DESKTOP, type E2E, numberIn, PHONE, startE2E } from './support/browser';

let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

const number = numberIn;

describe('a technician on a phone', () => {
  it('uploads a trace, reads the distance and where to dig, moves a cursor and confirms the finding', async () => {
    const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
    const cable = (await CableType.findByPk(run.cableTypeId))!;
    // An open 400 m of cable from end A, written with the run's own VF.
    const csv = stepTraceCsv({ faultM: 400, vf: cable.vf, samples: 9000 });

    const page = await e2e.pageAs('tech@example.com', PHONE);
    await page.getByRole('button', { name: 'Menu' }).click();
    await page.getByRole('link', { name: 'Upload trace' }).first().click();
    await page.getByRole('heading', { name: 'Upload a trace' }).waitFor();
    await page.getByLabel('Site').selectOption({ label: 'Harrowmere North substation' });
    await page.getByLabel('Cable run').selectOption({ label: 'Feeder HN-3 to Ashby Lane' });
    await page.getByRole('button', { name: /End A/ }).click();
    await page.getByLabel('Trace files').setInputFiles({ name: 'hn3-from-bay3.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
    await page.getByText('hn3-from-bay3.csv').waitFor();
    expect(await page.getByRole('note', { name: 'Safety caution' }).isVisible()).toBe(true);
    await e2e.screenshot(page, 'field-upload-phone');
    await page.getByRole('button', { name: 'Upload and analyse' }).click();

    const distance = page.getByTestId('fault-distance');
    await distance.waitFor({ timeout: 20_000 });
    // d = VF·c·t/2 puts the open back at 400 m (the file was written from that distance).
    expect(Math.abs(number(await distance.textContent()) - 400)).toBeLessThan(1);
    // Hand-worked: 400 m of cable passes MH-1 (4 m coiled) and MH-2 (6 m coiled) → 390 m of route,
    // 80 m past MH-2 (chainage 310 m) toward the road crossing RC-1 (455 m).
    const where = (await page.getByTestId('route-position').textContent()) ?? '';
    expect(where).toMatch(/^(79|80)\.\d m past manhole MH-2 toward road crossing RC-1; dig on the ground/);
    await page.locator('canvas').first().waitFor();
    await e2e.screenshot(page, 'field-trace-phone');
    // The header's site link is a 44 px target on a phone: it has a row of its own, and the words after it
    // keep the body's line spacing instead of a 44 px gap after their first line.
    const head = await page.getByTestId('trace-subtitle').evaluate((el) => {
      const link = el.querySelector('a')!.getBoundingClientRect();
      const words = el.querySelector(':scope > span')!;
      const range = document.createRange();
      range.selectNodeContents(words);
      const tops = [...new Set([...range.getClientRects()].map((r) => Math.round(r.top)))].sort((a, b) => a - b);
      return { linkBottom: link.bottom, wordsTop: words.getBoundingClientRect().top, tops };
    });
    expect(head.wordsTop).toBeGreaterThanOrEqual(head.linkBottom - 1);
    expect(head.tops.length).toBeGreaterThanOrEqual(2);
    // 15 px text at a line height of about 1.4 is 21 px a line (common practice); 30 px leaves room and still fails a 44 px gap.
    for (let i = 1; i < head.tops.length; i += 1) expect(head.tops[i]! - head.tops[i - 1]!).toBeLessThan(30);

    // Cursor 2 starts on the event; slide cursor 1 to about 300 m and read the gap.
    const gap = page.getByTestId('cursor-gap');
    const before = await gap.textContent();
    await page.getByLabel('Cursor 1 position').fill('300');
    await expect.poll(() => gap.textContent()).not.toBe(before);
    expect(Math.abs(number(await page.getByTestId('cursor-1').textContent()) - 300)).toBeLessThan(0.5);
    expect(Math.abs(number(await gap.textContent()) - 100)).toBeLessThan(1.5);
    // A tap on the chart moves the chosen cursor too.
    await page.getByTestId('trace-chart').scrollIntoViewIfNeeded();
    const box = (await page.getByTestId('trace-chart').boundingBox())!;
    await page.mouse.click(box.x + box.width * 0.2, box.y + box.height / 2);
    await expect.poll(async () => number(await page.getByTestId('cursor-1').textContent())).not.toBe(300);

    await page.getByRole('button', { name: 'Confirm fault' }).click();
    await page.getByRole('status').filter({ hasText: 'Confirmed as a fault' }).waitFor();
    await page.getByRole('link', { name: /^finding \d+$/ }).click();
    await page.getByRole('heading', { name: /Finding \d+: Open conductor/ }).waitFor();
    expect(await page.getByRole('note', { name: 'Safety caution' }).isVisible()).toBe(true);
    // The one reading is the best location: the place to dig is said once, in the headline, as the trace page said it.
    expect(await page.getByTestId('best-route-position').textContent()).toBe(where);
    expect(await page.getByTestId('reading-alone').textContent()).toBe('The best location above is this reading alone: the same distance, window and place to dig.');
    expect(await page.getByTestId('route-position').count()).toBe(0);
    await e2e.screenshot(page, 'field-finding-phone');

    const findings = await Finding.findAll({ where: { cableRunId: run.id, status: 'confirmed' } });
    const mine = findings.find((f) => Math.abs(f.distanceM - 400) < 1);
    expect(mine?.routePositionText).toMatch(/past manhole MH-2 toward road crossing RC-1/);

    const desk = await e2e.pageAs('supervisor@example.com', DESKTOP);
    await desk.goto(`${e2e.baseUrl}/traces/${mine!.traceId}`);
    await desk.getByTestId('fault-distance').waitFor();
    await desk.locator('canvas').first().waitFor();
    await e2e.screenshot(desk, 'field-trace-desktop');
    await desk.goto(`${e2e.baseUrl}/sites/${run.siteId}/runs/${run.id}`);
    await desk.getByRole('heading', { name: 'Route markers' }).waitFor();
    expect(await desk.getByLabel('Chainage (m)').count()).toBe(5);
    await e2e.screenshot(desk, 'field-run-desktop');
    await page.goto(`${e2e.baseUrl}/traces`);
    await page.getByRole('link', { name: 'hn3-from-bay3.csv' }).waitFor();
    await e2e.screenshot(page, 'field-traces-phone');
    await page.close();
    await desk.close();
  });
});
