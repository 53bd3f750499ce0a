import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { submitCalibration } from '../../server/calibrations/calibrations.service';
import { CableCalibration, CableRun, CableType, RouteMarker, Site, Trace, TraceArchiveEvent, TraceOutcome, User } from '../../server/db/models';
import { stepTraceCsv } from '../support/step-trace';
import path from 'node:path';
import type { Locator } from 'playwright-core';
import { DESKTOP, type E2E, numberIn, PHONE, SCREENSHOT_DIR, startE2E } from './support/browser';

let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

/** A picture of one part of the page, to look at closely. */
const part = (l: Locator, name: string) => l.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}.png`) });

const number = numberIn;

async function signedIn(email: string, viewport = PHONE) {
  const page = await e2e.pageAs(email, viewport);
  return page;
}

async function runNamed(name: string) {
  const run = (await CableRun.findOne({ where: { name } }))!;
  const site = (await Site.findByPk(run.siteId))!;
  const cable = (await CableType.findByPk(run.cableTypeId))!;
  return { run, site, cable };
}

async function chooseAndUpload(page: Page, runName: string, file: { name: string; body: string | Buffer }) {
  const { run, site } = await runNamed(runName);
  await page.goto(`${e2e.baseUrl}/upload?site=${site.id}&run=${run.id}&end=A`);
  await page.getByRole('heading', { name: 'Upload a trace' }).waitFor();
  await page.getByLabel('Cable run').selectOption({ label: runName });
  await page.getByLabel('Trace files').setInputFiles({ name: file.name, mimeType: 'text/csv', buffer: Buffer.from(file.body) });
  await page.getByText(file.name).first().waitFor();
  await page.getByRole('button', { name: 'Upload and analyse' }).click();
}

type Box = { x: number; y: number; width: number; height: number };
const overlap = (a: Box, b: Box) => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;

describe('a healthy cable and a repeated upload, on a phone', () => {
  it('reads a far end 0.3 % past the recorded length as the far end, records the cable healthy, and warns when the same file is sent again', async () => {
    const { run, cable } = await runNamed('Radio mast feeder BF-R1');
    // The run is recorded as 120.0 m; the file puts its open at 120.4 m (0.3 % further) with the run's own VF.
    const csv = stepTraceCsv({ faultM: 120.4, vf: cable.vf, samples: 3000 });
    const page = await signedIn('tech@example.com');
    await chooseAndUpload(page, 'Radio mast feeder BF-R1', { name: 'bf-r1-no-fault.csv', body: csv });

    const far = page.getByTestId('far-end-distance');
    await far.waitFor({ timeout: 30_000 });
    expect(Math.abs(number(await far.textContent()) - 120.4)).toBeLessThan(1);
    expect(await page.getByTestId('far-end-check').textContent()).toMatch(/^The run is recorded as 120\.0 m, inside this window: the reading agrees with it \(.* longer, 0\.\d %/);
    expect(await page.locator('main').textContent()).not.toContain('beyond the far end');
    expect(await page.getByRole('heading', { name: /\(far end of the run\)$/ }).isVisible()).toBe(true);
    expect(await page.getByRole('note', { name: 'Safety caution' }).isVisible()).toBe(true);
    await part(page.locator('section').filter({ has: far }), 'trace-far-end-phone');

    await page.getByRole('button', { name: 'Far end, cable healthy' }).click();
    const recorded = page.getByTestId('healthy-recorded');
    await recorded.waitFor();
    expect(await recorded.textContent()).toMatch(/^Recorded as the far end of a healthy cable: 120\.\d m measured, by Ines Ravelo/);
    const traceId = Number(page.url().split('/').pop());
    const outcome = await TraceOutcome.findOne({ where: { traceId } });
    expect(outcome?.kind).toBe('far-end-healthy');
    expect(outcome?.cableRunId).toBe(run.id);
    expect(Math.abs(outcome!.measuredLengthM - 120.4)).toBeLessThan(1);
    await e2e.screenshot(page, 'trace-healthy-recorded-phone');

    // The same bytes again on the same run and end: a warning naming the earlier trace, nothing stored, the form cleared.
    const before = await Trace.count({ where: { cableRunId: run.id } });
    await chooseAndUpload(page, 'Radio mast feeder BF-R1', { name: 'bf-r1-no-fault-again.csv', body: csv });
    const warning = page.getByRole('status').filter({ hasText: 'Already uploaded: not stored again' });
    await warning.waitFor();
    expect(await page.getByTestId('duplicate-list').textContent()).toContain('bf-r1-no-fault-again.csv is already on this run from this end');
    expect(await warning.getByRole('link', { name: `open trace ${traceId}` }).isVisible()).toBe(true);
    expect(await Trace.count({ where: { cableRunId: run.id } })).toBe(before);
    expect(await page.getByRole('button', { name: 'Remove bf-r1-no-fault-again.csv' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Upload and analyse' }).isDisabled()).toBe(true);
    await e2e.screenshot(page, 'upload-duplicate-phone');
    await page.close();
  });
});

describe('archiving a junk upload', () => {
  it('clears a refused file from the form, archives the stored copy out of the list, and an administrator restores it', async () => {
    const page = await signedIn('tech@example.com');
    const junk = Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), Buffer.from('IHDR not a trace')]);
    await chooseAndUpload(page, 'Control pair HN-C2', { name: 'photo-of-the-pit.csv', body: junk });
    await page.getByText('The file was kept, but it could not be read').waitFor({ timeout: 30_000 });
    expect(await page.getByTestId('upload-form-state').textContent()).toBe('The file was cleared from the form, so it is not sent again. Choose another file.');
    expect(await page.getByRole('button', { name: 'Upload and analyse' }).isDisabled()).toBe(true);
    // Choosing the same file again does not bring it back.
    await page.getByLabel('Trace files').setInputFiles({ name: 'photo-of-the-pit.csv', mimeType: 'text/csv', buffer: junk });
    await page.getByTestId('upload-skipped').waitFor();
    expect(await page.getByRole('button', { name: 'Upload and analyse' }).isDisabled()).toBe(true);
    await e2e.screenshot(page, 'upload-refused-cleared-phone');

    await page.getByRole('link', { name: 'See the stored file photo-of-the-pit.csv' }).click();
    await page.getByText('This file could not be read').waitFor();
    const traceId = Number(page.url().split('/').pop());
    await page.getByRole('button', { name: 'Archive this trace…' }).click();
    const dialog = page.getByRole('dialog', { name: 'Archive photo-of-the-pit.csv?' });
    await dialog.waitFor();
    expect(await dialog.getByRole('button', { name: 'Archive the trace' }).isDisabled()).toBe(true);
    await dialog.getByLabel('Why').fill('A photo saved as CSV by mistake');
    await e2e.screenshot(page, 'trace-archive-dialog-phone');
    await dialog.getByRole('button', { name: 'Archive the trace' }).click();
    await page.getByTestId('archived-reason').waitFor();
    expect(await page.getByTestId('archived-reason').textContent()).toMatch(/^Ines Ravelo archived it .*: A photo saved as CSV by mistake$/);
    await page.goto(`${e2e.baseUrl}/traces`);
    await page.getByRole('heading', { name: 'Traces' }).waitFor();
    await page.getByRole('link', { name: 'mv-cable-splice-fault.csv' }).first().waitFor();
    expect(await page.getByRole('link', { name: 'photo-of-the-pit.csv' }).count()).toBe(0);
    await e2e.screenshot(page, 'traces-after-archive-phone');
    await page.close();

    const admin = await signedIn('admin@example.com', DESKTOP);
    await admin.goto(`${e2e.baseUrl}/traces`);
    const archived = admin.getByTestId('archived-traces');
    await archived.waitFor();
    expect(await archived.textContent()).toContain('Archived by Ines Ravelo');
    await e2e.screenshot(admin, 'traces-archived-admin-desktop');
    await archived.getByRole('link', { name: /photo-of-the-pit\.csv/ }).click();
    await admin.getByRole('button', { name: 'Restore to the lists…' }).click();
    const restore = admin.getByRole('dialog', { name: `Restore trace ${traceId} to the lists?` });
    await restore.getByLabel('Why').fill('Kept for the instrument fault report');
    await restore.getByRole('button', { name: 'Restore the trace' }).click();
    await admin.getByTestId('archived-reason').waitFor({ state: 'detached' });
    expect((await Trace.findByPk(traceId))!.archivedAt).toBeNull();
    expect((await TraceArchiveEvent.findAll({ where: { traceId }, order: [['id', 'ASC']] })).map((e) => e.action)).toEqual(['archived', 'restored']);
    await admin.goto(`${e2e.baseUrl}/traces`);
    await admin.getByRole('table').getByRole('link', { name: 'photo-of-the-pit.csv' }).waitFor();
    expect(await admin.getByTestId('archived-traces').count()).toBe(0);
    await admin.close();
  });
});

describe('the trace chart', () => {
  async function crowdedRunTrace() {
    const { run } = await runNamed('Feeder HN-3 to Ashby Lane');
    if (!(await RouteMarker.findOne({ where: { cableRunId: run.id, label: 'JB-1' } }))) {
      // Ten joint bays 8 m apart between 330 and 402 m: on a phone their labels cannot all sit in one row.
      await RouteMarker.bulkCreate(Array.from({ length: 10 }, (_, i) => ({ cableRunId: run.id, label: `JB-${i + 1}`, kind: 'splice' as const, chainageM: 330 + 8 * i, slackM: 0, notes: null })));
    }
    return (await Trace.findOne({ where: { cableRunId: run.id, end: 'A', originalName: 'mv-cable-splice-fault.csv' } }))!;
  }

  for (const [size, viewport] of [
    ['phone', PHONE],
    ['desktop', DESKTOP],
  ] as const) {
    it(`never overlaps route-marker labels, and lets a cursor be dragged (${size})`, async () => {
      const trace = await crowdedRunTrace();
      const page = await signedIn('supervisor@example.com', viewport);
      await page.goto(`${e2e.baseUrl}/traces/${trace.id}`);
      await page.getByTestId('marker-label').first().waitFor();
      const labels = page.getByTestId('marker-label');
      const boxes: Box[] = [];
      for (let i = 0; i < (await labels.count()); i++) boxes.push((await labels.nth(i).boundingBox())!);
      const total = await RouteMarker.count({ where: { cableRunId: trace.cableRunId } });
      for (let i = 0; i < boxes.length; i++) for (let j = i + 1; j < boxes.length; j++) expect(overlap(boxes[i], boxes[j]), `labels ${i} and ${j}`).toBe(false);
      // Laid out naively (each centred on its marker in one row) some of them would have overlapped.
      const naive = await labels.evaluateAll((els) => els.map((el) => ({ x: Number(el.getAttribute('data-x')) - el.getBoundingClientRect().width / 2, y: 0, width: el.getBoundingClientRect().width, height: 1 })));
      expect(naive.some((a, i) => naive.some((b, j) => i < j && overlap(a, b)))).toBe(true);
      const rows = new Set(boxes.map((b) => Math.round(b.y)));
      expect(rows.size > 1 || boxes.length < total).toBe(true);
      await e2e.screenshot(page, `trace-chart-markers-${size}`);

      const frame = page.getByTestId('trace-chart-frame');
      await frame.scrollIntoViewIfNeeded();
      await part(frame, `trace-chart-labels-${size}`);
      // Drag cursor 2's handle to 60 % of the plot's width; its readout follows to the distance under that point.
      const geo = await frame.evaluate((el) => ({
        left: Number(el.getAttribute('data-plot-left')),
        right: Number(el.getAttribute('data-plot-right')),
        xMin: Number(el.getAttribute('data-x-min')),
        xMax: Number(el.getAttribute('data-x-max')),
        pageX: el.getBoundingClientRect().left,
      }));
      const handle = page.getByTestId('cursor-handle-2');
      const h = (await handle.boundingBox())!;
      const targetPx = geo.left + 0.6 * (geo.right - geo.left);
      await page.mouse.move(h.x + h.width / 2, h.y + h.height / 2);
      await page.mouse.down();
      await page.mouse.move(geo.pageX + (targetPx + h.x + h.width / 2 - geo.pageX) / 2, h.y + h.height / 2, { steps: 4 });
      await page.mouse.move(geo.pageX + targetPx, h.y + h.height / 2, { steps: 6 });
      await page.mouse.up();
      const expected = geo.xMin + 0.6 * (geo.xMax - geo.xMin);
      const metresPerPx = (geo.xMax - geo.xMin) / (geo.right - geo.left);
      await expect.poll(async () => Math.abs(number(await page.getByTestId('cursor-2').textContent()) - expected)).toBeLessThan(2 * metresPerPx + 0.1);
      const moved = (await handle.boundingBox())!;
      expect(Math.abs(moved.x + moved.width / 2 - (geo.pageX + targetPx))).toBeLessThan(3);

      // Drag cursor 1 by its line on the plot itself, from where it is to 30 %.
      const c1 = (await page.getByTestId('cursor-handle-1').boundingBox())!;
      const plot = (await page.getByTestId('trace-chart').boundingBox())!;
      const to1 = geo.left + 0.3 * (geo.right - geo.left);
      await page.mouse.move(c1.x + c1.width / 2, plot.y + plot.height / 2);
      await page.mouse.down();
      await page.mouse.move(geo.pageX + to1, plot.y + plot.height / 2, { steps: 8 });
      await page.mouse.up();
      const expected1 = geo.xMin + 0.3 * (geo.xMax - geo.xMin);
      await expect.poll(async () => Math.abs(number(await page.getByTestId('cursor-1').textContent()) - expected1)).toBeLessThan(2 * metresPerPx + 0.1);
      await part(page.locator('section').filter({ has: frame }), `trace-chart-cursors-${size}`);

      // In the time view the readouts are round-trip nanoseconds.
      await page.getByRole('button', { name: 'Time', exact: true }).click();
      expect(await page.getByTestId('cursor-1').textContent()).toMatch(/^\d+(\.\d+)? ns$/);
      expect(await page.getByTestId('cursor-gap').textContent()).toMatch(/^Between cursors: \d+(\.\d+)? ns round trip$/);
      await page.getByRole('button', { name: 'More vertical gain' }).click();
      await page.getByRole('button', { name: 'More vertical gain' }).click();
      expect(await page.getByTestId('vertical-gain').textContent()).toBe('×4');
      await page.getByLabel('Lift far echoes').check();
      await page.getByTestId('distance-gain-db').waitFor();
      await part(page.locator('section').filter({ has: frame }), `trace-chart-gain-${size}`);
      await page.close();
    });
  }
});

describe('accepting a calibration', () => {
  const coax = (name: string) =>
    CableType.create({
      name,
      construction: 'coax',
      dielectric: 'solid polyethylene',
      z0Ohm: 50,
      vf: 0.66,
      vfTolerance: 0.15,
      attenuationDbPer100m: null,
      attenuationFreqMhz: null,
      vfSource: 'handbook',
      vfReference: 'solid PE, εr ≈ 2.3',
      notes: null,
    });

  it('shows n, mean and spread of the accepted ones and proposes the mean with a tolerance from the spread, which the planner confirms', async () => {
    const cable = await coax('Proposal test coax');
    const tech = (await User.findOne({ where: { email: 'tech@example.com' } }))!;
    const admin = (await User.findOne({ where: { email: 'admin@example.com' } }))!;
    for (const vf of [0.655, 0.662]) {
      await CableCalibration.create({
        cableTypeId: cable.id,
        knownLengthM: 100,
        roundTripNs: (200 / (vf * 299_792_458)) * 1e9,
        vf,
        libraryVf: 0.66,
        source: 'manual',
        traceId: null,
        note: 'earlier calibration',
        status: 'accepted',
        submittedById: tech.id,
        reviewedById: admin.id,
        reviewedAt: new Date(),
        reviewReason: null,
      });
    }
    // 120 m in 1212.95 ns round trip → VF = 2L/(c·t) = 0.6600.
    const filed = await submitCalibration({ cableTypeId: cable.id, knownLengthM: 120, roundTripNs: 1212.95, submittedById: tech.id, source: 'manual', note: 'Drum length 120 m' });

    for (const [size, viewport] of [
      ['phone', PHONE],
      ['desktop', DESKTOP],
    ] as const) {
      const page = await signedIn('planner@example.com', viewport);
      await page.goto(`${e2e.baseUrl}/calibrations`);
      const proposal = page.getByTestId(`proposal-${filed.id}`);
      await proposal.waitFor();
      // Hand-worked: accepted 0.655 and 0.662 → n = 2, mean 0.6585, s = |0.662 − 0.655| / √2 = 0.00495.
      expect(await proposal.getByTestId('accepted-stats').textContent()).toBe('Accepted so far for Proposal test coax: n = 2 · mean VF 0.6585 · spread (s.d.) 0.0049.');
      // With 0.6600 added: mean 0.6590; s = √((16 + 9 + 1)·10⁻⁶ / 2) = 0.003606; 2·s/mean = 1.094 % → ±1.1 %.
      expect(await proposal.getByLabel('VF to store').inputValue()).toBe('0.6590');
      expect(await proposal.getByLabel('Tolerance (± %)').inputValue()).toBe('1.1');
      await part(page.getByTestId(`calibration-${filed.id}`), `calibration-proposal-${size}`);
      if (size === 'desktop') {
        await page.getByRole('button', { name: 'Accept into the library: VF 0.6590 ± 1.1 %' }).click();
        await page.getByTestId(`calibration-${filed.id}`).waitFor({ state: 'detached' });
        await cable.reload();
        expect([cable.vf, cable.vfTolerance]).toEqual([0.659, 0.011]);
        await page.goto(`${e2e.baseUrl}/cables/${cable.id}`);
        const stats = page.getByTestId('calibration-stats');
        await stats.waitFor();
        expect(await stats.textContent()).toBe('Accepted (n)3Mean VF0.6590Spread (s.d.)0.0036');
        // The library's reference to the calibration gives its length as every length on the page is given.
        expect(await page.getByTestId('vf-reference').textContent()).toMatch(/^Mean of the accepted field calibrations of this cable type, the last #\d+: 120\.0 m known length, 1212\.95 ns round trip /);
        await part(page.locator('section').filter({ has: stats }), 'cable-calibrations-desktop');
      }
      await page.close();
    }
  });

  it('draws a single calibration as one point named by its number', async () => {
    const cable = await coax('One calibration coax');
    const tech = (await User.findOne({ where: { email: 'tech@example.com' } }))!;
    const one = await submitCalibration({ cableTypeId: cable.id, knownLengthM: 120, roundTripNs: 1212.95, submittedById: tech.id, source: 'manual' });
    const page = await signedIn('planner@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/cables/${cable.id}`);
    const chart = page.getByRole('img', { name: 'Chart of 1 calibrations against the library VF 0.66' });
    await chart.waitFor();
    expect(await page.getByTestId('calibration-stats').textContent()).toBe('Accepted (n)0Mean VF—Spread (s.d.)—');
    expect(await page.getByRole('cell', { name: String(one.id), exact: true }).count()).toBe(1);
    await part(page.locator('section').filter({ has: chart }), 'cable-one-calibration-phone');
    // A picture of the dashboard's chart on the same phone, for its cable names (wrapped by wrapLabel, tested on its own).
    await page.goto(`${e2e.baseUrl}/dashboard`);
    const accuracy = page.getByRole('img', { name: 'Located-vs-found error per cable type' });
    await accuracy.waitFor();
    await part(page.locator('section').filter({ has: accuracy }), 'dashboard-accuracy-phone');
    await page.close();
  });
});

