/**
 * Measure the installable app with Debian's Chromium (a measurement, not a
 * test: the figures depend on the machine):
 *
 * - bytes the server sends for a first visit to the sign-in page, with the
 *   service worker kept out (what a browser must fetch to show Rholog);
 * - bytes for an offline-ready install: the first visit, signing in as a
 *   technician, the service worker's precache of the app shell and fonts, and
 *   the field data kept in IndexedDB — everything until the phone could work
 *   with no signal;
 * - time for the engine to analyse a 100,000-sample trace in the Web Worker,
 *   as the phone reports it, over five runs. (Chromium's CPU slowdown applies
 *   to a page's own thread, not to its workers, so it cannot stand in for a
 *   slower phone here; the load average is printed beside the times.)
 *
 * Bytes are counted on the server's sockets: headers and bodies as sent, the
 * built client compressed as the server serves it. Needs `npm run build` first.
 *
 *   npx tsx scripts/measure-offline.ts
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Server, Socket } from 'node:net';
import type { AddressInfo } from 'node:net';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { createApp } from '../server/app';
import { CableRun, CableType } from '../server/db/models';
import { stepTraceCsv } from '../tests/support/step-trace';
import { freshDatabase, testConfig } from '../tests/support/test-config';
import { CHROMIUM_ARGS, CHROMIUM_PATH } from '../tests/e2e/support/chromium';

const PHONE = { width: 390, height: 844 };

const db = await freshDatabase();
const app = await createApp(testConfig(db.url, db.dir, { client: 'static', demoData: true }));
const sockets = new Set<Socket>();
let closedBytes = 0;
const server: Server = await new Promise((resolve) => {
  const s = app.app.listen(0, '127.0.0.1', () => resolve(s));
});
server.on('connection', (sock: Socket) => {
  sockets.add(sock);
  sock.on('close', () => {
    closedBytes += sock.bytesWritten;
    sockets.delete(sock);
  });
});
const sentBytes = () => closedBytes + [...sockets].reduce((n, s) => n + s.bytesWritten, 0);
const baseUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
const kib = (b: number) => `${(b / 1024).toFixed(0)} KiB (${b.toLocaleString('en')} bytes)`;

async function context(serviceWorkers: 'allow' | 'block'): Promise<{ ctx: BrowserContext; dir: string }> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-measure-'));
  const ctx = await chromium.launchPersistentContext(dir, {
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: CHROMIUM_ARGS,
    serviceWorkers,
  });
  return { ctx, dir };
}

async function settle(page: Page) {
  await page.waitForLoadState('networkidle');
}

async function analyseOnce(page: Page, name: string, csv: string): Promise<number> {
  await page.goto(`${baseUrl}/device/analyse`);
  await page.getByLabel('Site').selectOption({ label: 'Harrowmere North substation' });
  await page.getByLabel('Cable run').selectOption({ label: 'Feeder HN-3 to Ashby Lane' });
  await page.getByRole('button', { name: /End A/ }).click();
  await page.getByLabel('Trace file').setInputFiles({ name, mimeType: 'text/csv', buffer: Buffer.from(csv) });
  await page.getByRole('button', { name: 'Analyse on this phone' }).click();
  const line = page.getByTestId('device-engine');
  await line.waitFor({ timeout: 120_000 });
  const text = (await line.textContent()) ?? '';
  const ms = Number(/analysed in (\d+) ms/.exec(text)?.[1]);
  const samples = /([\d,]+) samples/.exec(text)?.[1];
  if (samples?.replace(/,/g, '') !== '100000') throw new Error(`Expected 100,000 samples, the phone read ${samples}`);
  return ms;
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

try {
  // 1. First visit, no service worker.
  const first = await context('block');
  const before1 = sentBytes();
  const p1 = await first.ctx.newPage();
  await p1.setViewportSize(PHONE);
  await p1.goto(`${baseUrl}/sign-in`);
  await settle(p1);
  const firstVisit = sentBytes() - before1;
  await first.ctx.close();
  fs.rmSync(first.dir, { recursive: true, force: true });

  // 2. Offline-ready install: first visit with the service worker, sign in, field data saved.
  const install = await context('allow');
  const before2 = sentBytes();
  const page = await install.ctx.newPage();
  await page.setViewportSize(PHONE);
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail').fill('tech@example.com');
  await page.getByLabel('Password').fill('rholog-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByTestId('signed-in-name').first().waitFor({ state: 'attached' });
  await page.evaluate(() => navigator.serviceWorker.ready.then(() => undefined));
  await page.goto(`${baseUrl}/device`);
  await page.getByTestId('field-data-age').waitFor();
  await settle(page);
  const offlineReady = sentBytes() - before2;
  const precached = await page.evaluate(async () => {
    let n = 0;
    for (const name of await caches.keys()) n += (await (await caches.open(name)).keys()).length;
    return n;
  });

  // 3. The engine on a 100,000-sample trace, offline (nothing is sent while measuring).
  const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
  const cable = (await CableType.findByPk(run.cableTypeId))!;
  const csv = stepTraceCsv({ faultM: 2000, vf: cable.vf, samples: 100_000 });
  await install.ctx.setOffline(true);
  const plain: number[] = [];
  for (let i = 0; i < 5; i++) plain.push(await analyseOnce(page, `measure-${i}.csv`, csv));
  await install.ctx.close();
  fs.rmSync(install.dir, { recursive: true, force: true });

  console.log(
    `Chromium at ${PHONE.width}×${PHONE.height}; load average ${os.loadavg()[0].toFixed(2)} on ${os.cpus().length} cores`,
  );
  console.log(`First visit (sign-in page, no service worker): ${kib(firstVisit)}`);
  console.log(`Offline-ready install (first visit, sign-in, precache of ${precached} files, field data): ${kib(offlineReady)}`);
  console.log(
    `100,000-sample trace (${(csv.length / 1024).toFixed(0)} KiB CSV) analysed on the device: median ${median(plain)} ms [${plain.join(', ')}]`,
  );
} finally {
  await new Promise<void>((resolve) => server.close(() => resolve()));
  await app.close();
  await db.cleanup();
}
