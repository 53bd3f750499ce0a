import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableRun, CableType, Trace } from '../../server/db/models';
import { stepTraceCsv } from '../support/step-trace';
import { DESKTOP, type E2E, numberIn, startE2E } from './support/browser';

/** Files above 100 KiB are analysed in the background here (a 12,000-sample file is about 157 kB). */
let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E({ analysisInlineMaxBytes: 100 * 1024 });
});
afterAll(async () => {
  await e2e?.stop();
});

const number = numberIn;

describe('a large upload', () => {
  it('opens its trace page saying "Analysing…", then shows the distance once the background analysis is in', async () => {
    const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
    const cable = (await CableType.findByPk(run.cableTypeId))!;
    // An open 400 m of cable from end A, written with the run's own VF.
    const csv = stepTraceCsv({ faultM: 400, vf: cable.vf, samples: 12_000 });
    expect(csv.length).toBeGreaterThan(100 * 1024);

    // Hold the background analysis at its first step until the page has shown the waiting state.
    const storage = e2e.app.ctx.storage;
    const checkout = storage.checkout.bind(storage);
    let release!: () => void;
    const gate = new Promise<void>((resolve) => (release = resolve));
    storage.checkout = async (key, sha256) => {
      await gate;
      return checkout(key, sha256);
    };
    try {
      const page = await e2e.pageAs('tech@example.com', DESKTOP);
      await page.goto(`${e2e.baseUrl}/upload`);
      await page.getByRole('heading', { name: 'Upload a trace' }).waitFor();
      await page.getByLabel('Site').selectOption({ label: 'Harrowmere North substation' });
      await page.getByLabel('Cable run').selectOption({ label: 'Feeder HN-3 to Ashby Lane' });
      await page.getByRole('button', { name: /End A/ }).click();
      await page
        .getByLabel('Trace files')
        .setInputFiles({ name: 'hn3-long-record.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
      await page.getByText('hn3-long-record.csv').waitFor();
      await page.getByRole('button', { name: 'Upload and analyse' }).click();

      await page.getByRole('status').filter({ hasText: 'Analysing…' }).waitFor({ timeout: 20_000 });
      const row = await Trace.findOne({ where: { originalName: 'hn3-long-record.csv' } });
      expect(row!.status).toBe('pending');
      expect(page.url()).toBe(`${e2e.baseUrl}/traces/${row!.id}`);
      await e2e.screenshot(page, 'trace-pending-desktop');

      release();
      const distance = page.getByTestId('fault-distance');
      await distance.waitFor({ timeout: 30_000 });
      // d = VF·c·t/2 puts the open back at 400 m (the file was written from that distance).
      expect(Math.abs(number(await distance.textContent()) - 400)).toBeLessThan(1);
      expect(await page.getByRole('status').filter({ hasText: 'Analysing…' }).count()).toBe(0);
      await page.close();
    } finally {
      release();
      storage.checkout = checkout;
    }
  }, 90_000);
});
