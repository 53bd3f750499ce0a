/**
 * Measure the client with Debian's Chromium (a measurement, not a test: the
 * figures depend on the machine):
 *
 * - bytes the server sends for a first visit to the sign-in page, with the
 *   service worker kept out (what a browser must fetch to show Rholog);
 * - bytes for a technician's first load: the sign-in page, signing in, and
 *   the start page, service worker kept out (goal: under 250 kB);
 * - time for the trace page to draw a 100,000-sample trace, from navigation
 *   to the chart's first drawing, at desktop and phone sizes, over five
 *   loads (goal: under 1 s), and time for a zoom to about 11× to fetch the
 *   record's own detail for the view and draw it;
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
 *   npm run measure:client   (npx tsx scripts/measure-client.ts)
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Server, Socket } from 'node:net';
import type { AddressInfo } from 'node:net';
import { chromium, type BrowserContext, type Page, type Request } from 'playwright-core';
import { createApp } from '../server/app';
import { CableRun, CableType } from '../server/db/models';
import { stepTraceCsv } from '../tests/support/step-trace';
import { freshDatabase, testConfig } from '../tests/support/test-config';
import { CHROMIUM_ARGS, CHROMIUM_PATH } from '../tests/e2e/support/chromium';

const PHONE = { width: 390, height: 844 };
const DESKTOP = { width: 1366, height: 900 };

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

  // 1b. A technician's first load, no service worker: the sign-in page, signing in, the start page.
  const tech = await context('block');
  const before1b = sentBytes();
  const tp = await tech.ctx.newPage();
  await tp.setViewportSize(PHONE);
  // The same bytes by kind, as the browser counts them (headers and compressed bodies).
  const byKind = { app: 0, data: 0, other: 0 };
  const counting = async (req: Request) => {
    const s = await req.sizes();
    const type = req.resourceType();
    const kind = ['document', 'script', 'stylesheet', 'font'].includes(type) ? 'app' : ['fetch', 'xhr'].includes(type) ? 'data' : 'other';
    byKind[kind] += s.responseHeadersSize + s.responseBodySize;
  };
  tp.on('requestfinished', counting);
  await tp.goto(`${baseUrl}/sign-in`);
  await tp.getByLabel('E-mail').fill('tech@example.com');
  await tp.getByLabel('Password').fill('rholog-demo');
  await tp.getByRole('button', { name: 'Sign in' }).click();
  await tp.getByTestId('signed-in-name').first().waitFor({ state: 'attached' });
  await settle(tp);
  const techFirstLoad = sentBytes() - before1b;
  const startPath = new URL(tp.url()).pathname;
  tp.off('requestfinished', counting);

  // 1c. The trace page drawing a 100,000-sample trace (uploaded once, then opened afresh five times per size).
  const hn3 = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
  const hn3Cable = (await CableType.findByPk(hn3.cableTypeId))!;
  const bigCsv = stepTraceCsv({ faultM: 2000, vf: hn3Cable.vf, samples: 100_000 });
  await tp.goto(`${baseUrl}/upload?site=${hn3.siteId}&run=${hn3.id}&end=A`);
  await tp.getByRole('heading', { name: 'Upload a trace' }).waitFor();
  await tp.getByLabel('Trace files').setInputFiles({ name: 'measure-100k.csv', mimeType: 'text/csv', buffer: Buffer.from(bigCsv) });
  await tp.getByText('measure-100k.csv').first().waitFor();
  await tp.getByRole('button', { name: 'Upload and analyse' }).click();
  await tp.waitForURL(/\/traces\/\d+$/, { timeout: 120_000 });
  const tracePath = new URL(tp.url()).pathname;
  const drawn = '[data-testid="trace-chart-frame"][data-x-min]';
  const drawMs: Record<'desktop' | 'phone', number[]> = { desktop: [], phone: [] };
  for (const [size, viewport] of [['desktop', DESKTOP], ['phone', PHONE]] as const) {
    await tp.setViewportSize(viewport);
    for (let i = 0; i < 5; i++) {
      await tp.goto(`${baseUrl}${tracePath}`);
      await tp.waitForSelector(drawn, { timeout: 60_000 });
      drawMs[size].push(Math.round(await tp.evaluate(() => performance.now())));
    }
  }
  // Zoom to about 11× (six steps of 1.5×): the chart asks for the record's own samples in view and draws them.
  await tp.setViewportSize(DESKTOP);
  await tp.goto(`${baseUrl}${tracePath}`);
  await tp.waitForSelector(drawn, { timeout: 60_000 });
  const closer = tp.getByRole('button', { name: 'Closer', exact: true });
  for (let i = 0; i < 5; i++) await closer.click();
  const detail = tp.waitForResponse((r) => /\/api\/traces\/\d+\/samples\?/.test(r.url()), { timeout: 30_000 });
  const zoomT0 = Date.now();
  await closer.click();
  const detailAnswer = await detail;
  const detailPoints = ((await detailAnswer.json()) as { samples: unknown[] }).samples.length;
  await tp.evaluate(() => new Promise((resolve) => requestAnimationFrame(() => requestAnimationFrame(resolve))));
  const zoomMs = Date.now() - zoomT0;
  await tech.ctx.close();
  fs.rmSync(tech.dir, { recursive: true, force: true });

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
  console.log(`Technician's first load (sign-in page, sign-in, start page ${startPath}; no service worker): ${kib(techFirstLoad)} in all`);
  console.log(
    `  of which the app's own files (page, scripts, styles, fonts) ${kib(byKind.app)} — goal under 250 kB; the API's answers (the field data kept for use without signal among them) ${kib(byKind.data)}; icons and manifest ${kib(byKind.other)}`,
  );
  for (const size of ['desktop', 'phone'] as const) {
    const v = size === 'desktop' ? DESKTOP : PHONE;
    console.log(
      `Trace page, 100,000-sample trace, ${size} ${v.width}×${v.height}: drawn ${median(drawMs[size])} ms after navigation (median of 5: [${drawMs[size].join(', ')}]) — goal under 1000 ms`,
    );
  }
  console.log(`Zoom to about 11× on the desktop: the view's own samples (${detailPoints} points) fetched and drawn in ${zoomMs} ms`);
  console.log(`Offline-ready install (first visit, sign-in, precache of ${precached} files, field data): ${kib(offlineReady)}`);
  console.log(
    `100,000-sample trace (${(csv.length / 1024).toFixed(0)} KiB CSV) analysed on the device: median ${median(plain)} ms [${plain.join(', ')}]`,
  );
} finally {
  await new Promise<void>((resolve) => server.close(() => resolve()));
  await app.close();
  await db.cleanup();
}
