import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import type { Page, Route } from 'playwright-core';
import { CableRun, CableType, Finding, Trace, User } from '../../server/db/models';
import { hashPassword } from '../../server/auth/passwords';
import { updateUser } from '../../server/users/users.service';
import { updateCable } from '../../server/cables/cables.service';
import { stepTraceCsv } from '../support/step-trace';
import { type E2E, numberIn, PHONE, signIn, startE2E } from './support/browser';

let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});
// Whatever a test left behind, the next one starts with the network on.
afterEach(async () => {
  await e2e?.context.setOffline(false);
});

const number = numberIn;

/** The service worker is active and its precache complete: the app can start with no network. */
async function offlineReady(page: Page) {
  await page.evaluate(async () => {
    const reg = await navigator.serviceWorker.ready;
    return reg.active?.state;
  });
}

async function analyseOnPhone(page: Page, fileName: string, csv: string) {
  await page.getByLabel('Site').selectOption({ label: 'Harrowmere North substation' });
  await page.getByLabel('Cable run').selectOption({ label: 'Feeder HN-3 to Ashby Lane' });
  await page.getByRole('button', { name: /End A/ }).click();
  const missing = page.getByTestId('device-analyse-missing');
  expect(await missing.textContent()).toBe('Still needed: a trace file.');
  await page.getByLabel('Trace file').setInputFiles({ name: fileName, mimeType: 'text/csv', buffer: Buffer.from(csv) });
  await page.getByText(fileName).waitFor();
  expect(await missing.count()).toBe(0);
  expect(await page.getByRole('button', { name: 'Analyse on this phone' }).getAttribute('aria-describedby')).toBeNull();
  // The file's size reads as everywhere else in Rholog (binary kilobytes, lower-case k).
  expect(await page.getByTestId('device-file-size').textContent()).toBe(`${Math.round(Buffer.byteLength(csv) / 1024)} kB`);
  await page.getByRole('button', { name: 'Analyse on this phone' }).click();
  await page.getByText('Analysed on this device, not yet uploaded').waitFor({ timeout: 20_000 });
}

describe('a technician with no signal', () => {
  it('opens the app offline, analyses a trace on the phone, confirms the fault, and it all arrives once when the network is back', async () => {
    const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
    const cable = (await CableType.findByPk(run.cableTypeId))!;
    // An open 400 m of cable from end A, written with the run's own VF.
    const csv = stepTraceCsv({ faultM: 400, vf: cable.vf, samples: 9000 });

    const page = await e2e.pageAs('tech@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/device`);
    // The field data this technician may read is on the phone before the signal goes.
    await page.getByTestId('field-data-age').waitFor();
    expect(await page.getByTestId('field-data-age').textContent()).toMatch(
      /^Saved .* ago .*: \d+ sites?, \d+ cable runs? with their route markers, \d+ cable types? of the library\.$/,
    );
    // Nothing has been sent from this phone yet, which the sync line says in words beside the saved field data.
    expect(await page.getByTestId('device-last-sync').textContent()).toBe('Nothing sent from this phone yet');
    await offlineReady(page);

    await e2e.context.setOffline(true);
    await page.reload();
    // Served by the service worker: no network at all.
    await page.getByRole('heading', { name: 'On this phone', exact: true }).waitFor();
    expect(await page.getByTestId('connection-state').textContent()).toBe('Offline');
    expect(await page.getByTestId('outbox-count').textContent()).toBe('Nothing waiting to send');

    await page.getByRole('link', { name: 'Analyse a trace on this phone' }).click();
    await page.getByRole('heading', { name: 'Analyse on this phone' }).waitFor();
    expect(await page.getByRole('note', { name: 'Safety caution' }).isVisible()).toBe(true);
    // Nothing chosen yet: the grey button says why, in words a screen reader reads with it.
    const analyse = page.getByRole('button', { name: 'Analyse on this phone' });
    expect(await analyse.isDisabled()).toBe(true);
    expect(await page.getByTestId('device-analyse-missing').textContent()).toBe(
      'Still needed: the site and cable run, the end the instrument is connected at and a trace file.',
    );
    expect(await analyse.getAttribute('aria-describedby')).toBe('device-analyse-missing');
    await e2e.screenshot(page, 'offline-analyse-phone');
    await analyseOnPhone(page, 'hn3-no-signal.csv', csv);

    // Everything at once: distance, window, route position — and marked as not yet on the server.
    const phoneDistance = (await page.getByTestId('fault-distance').textContent())!;
    // d = VF·c·t/2 puts the open back at 400 m (the file was written from that distance).
    expect(Math.abs(number(phoneDistance) - 400)).toBeLessThan(1);
    expect(await page.getByTestId('cable-window').textContent()).toMatch(
      /^Cable-length window: .* along the cable from end A, slack included$/,
    );
    // Hand-worked: 400 m of cable passes MH-1 (4 m coiled) and MH-2 (6 m coiled) → 390 m of route, 80 m past MH-2.
    const phoneWhere = (await page.getByTestId('route-position').textContent())!;
    expect(phoneWhere).toMatch(/^(79|80)\.\d m past manhole MH-2 toward road crossing RC-1/);
    expect(await page.getByTestId('device-upload-state').textContent()).toMatch(/^Waiting to send\./);

    await page.getByRole('button', { name: 'Confirm fault' }).click();
    await page.getByTestId('device-decision').waitFor();
    expect(await page.getByTestId('device-decision').textContent()).toBe(
      'Confirmed as a fault on this phone: waiting for its trace to be sent.',
    );
    expect(await page.getByTestId('outbox-count').textContent()).toBe('2 items waiting to send');
    await e2e.screenshot(page, 'offline-result-phone');

    await page.getByTestId('outbox-count').click();
    await page.getByRole('heading', { name: 'On this phone', exact: true }).waitFor();
    expect(await page.getByTestId('outbox-item').evaluateAll((els) => els.map((e) => e.getAttribute('data-state')))).toEqual([
      'queued',
      'queued',
    ]);
    await e2e.screenshot(page, 'offline-outbox-phone');

    // Back online, the first send reaches the server but its answer is cut off on the way back.
    const tracesBefore = await Trace.count();
    const keys: string[] = [];
    let cutOff = 0;
    await page.route('**/api/traces', async (route: Route) => {
      if (route.request().method() !== 'POST') return route.continue();
      keys.push((await route.request().headerValue('idempotency-key')) ?? '');
      if (cutOff === 0) {
        cutOff++;
        await route.fetch();
        return route.abort('connectionreset');
      }
      return route.continue();
    });
    await e2e.context.setOffline(false);
    await expect
      .poll(() => page.getByTestId('outbox-item').first().getAttribute('data-state'), { timeout: 20_000 })
      .toBe('failed');
    expect(await Trace.count()).toBe(tracesBefore + 1);
    expect(await page.getByTestId('outbox-problem').first().textContent()).toMatch(/Could not reach Rholog/);
    await e2e.screenshot(page, 'offline-sync-failed-phone');

    await page.getByRole('button', { name: 'Try again' }).first().click();
    await expect.poll(() => page.getByTestId('outbox-count').textContent(), { timeout: 20_000 }).toBe('Nothing waiting to send');
    expect(keys).toHaveLength(2);
    expect(keys[1]).toBe(keys[0]);
    expect(await Trace.count()).toBe(tracesBefore + 1);

    const trace = (await Trace.findOne({ where: { originalName: 'hn3-no-signal.csv' } }))!;
    const finding = await Finding.findOne({ where: { traceId: trace.id } });
    expect(finding?.status).toBe('confirmed');
    expect(finding?.kind).toBe('open-conductor');
    // The same engine and library values on both sides: the server's event is where the phone put it.
    expect(trace.deviceAnalysis?.engineVersion).toBe(trace.engineVersion);
    expect(trace.deviceAnalysis?.events.map((e) => e.distanceM)).toEqual(
      trace.analysis!.events.slice(0, 12).map((e) => Math.round(e.distanceM * 1000) / 1000),
    );
    expect(Math.abs(finding!.distanceM - number(phoneDistance))).toBeLessThan(0.05);
    await e2e.screenshot(page, 'offline-synced-phone');

    // The trace page shows the server's analysis, the same distance and place, and that the phone agreed.
    await page.goto(`${e2e.baseUrl}/traces/${trace.id}`);
    await page.getByTestId('fault-distance').waitFor();
    expect(await page.getByTestId('fault-distance').textContent()).toBe(phoneDistance);
    expect(await page.getByTestId('route-position').textContent()).toBe(phoneWhere);
    expect(await page.getByTestId('device-comparison').textContent()).toMatch(
      /before it was uploaded: the server’s analysis agrees/,
    );
    await page.unroute('**/api/traces');
    await page.close();
  });
});

describe('a device whose account was deactivated while it was offline', () => {
  it('sends nothing, keeps the trace on the phone, and shows it to an administrator to recover', async () => {
    const user = await User.create({
      email: 'kit.field@example.com',
      name: 'Kit Fielding',
      role: 'technician',
      passwordHash: await hashPassword('Skylark-Ridge-4417'),
      active: true,
      mustChangePassword: false,
      unitPreference: 'm',
    } as never);
    const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
    const cable = (await CableType.findByPk(run.cableTypeId))!;
    const page = await e2e.pageAs('kit.field@example.com', PHONE, 'Skylark-Ridge-4417');
    await page.goto(`${e2e.baseUrl}/device/analyse`);
    await page.getByLabel('Site').waitFor();
    await offlineReady(page);
    await e2e.context.setOffline(true);
    await analyseOnPhone(page, 'kit-offline.csv', stepTraceCsv({ faultM: 250, vf: cable.vf, samples: 6000 }));

    const admin = (await User.findOne({ where: { email: 'admin@example.com' } }))!;
    await updateUser(
      e2e.app.ctx,
      user.id,
      { active: false },
      { id: admin.id, email: admin.email, name: admin.name, role: admin.role },
    );
    const tracesBefore = await Trace.count();

    await e2e.context.setOffline(false);
    // The server refuses the ended sign-in; the item waits on the phone for a sign-in that cannot come.
    await page.getByRole('button', { name: 'Sign in' }).waitFor({ timeout: 20_000 });
    await page.getByLabel('E-mail').fill('kit.field@example.com');
    await page.getByLabel('Password').fill('Skylark-Ridge-4417');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByText(/deactivated/).waitFor();
    expect(await Trace.count()).toBe(tracesBefore);
    expect(await Trace.count({ where: { originalName: 'kit-offline.csv' } })).toBe(0);

    await signIn(page, e2e.baseUrl, 'admin@example.com');
    await page.getByTestId('signed-in-name').first().waitFor({ state: 'attached' });
    await page.goto(`${e2e.baseUrl}/device`);
    await page.getByRole('heading', { name: 'Kept for other accounts' }).waitFor();
    const kept = page.getByTestId('outbox-item').filter({ hasText: 'kit-offline.csv' });
    expect(await kept.getAttribute('data-state')).toBe('sign-in');
    expect(await kept.textContent()).toContain('Waits for Kit Fielding to sign in');
    expect(await kept.getByRole('button', { name: 'Save the file' }).isVisible()).toBe(true);
    await e2e.screenshot(page, 'offline-kept-for-admin-phone');
    expect(await Trace.count()).toBe(tracesBefore);
    await page.close();
  });
});

describe('a trace analysed on the phone while the cable library changed', () => {
  it('shows the phone’s and the server’s analysis side by side, and leaves a decision the server cannot place to the trace page', async () => {
    const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
    const cable = (await CableType.findByPk(run.cableTypeId))!;
    const phoneVf = cable.vf;
    const page = await e2e.pageAs('tech@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/device/analyse`);
    await page.getByLabel('Site').waitFor();
    await offlineReady(page);
    await e2e.context.setOffline(true);
    await analyseOnPhone(page, 'hn3-before-calibration.csv', stepTraceCsv({ faultM: 300, vf: phoneVf, samples: 8000 }));
    expect(Math.abs(number(await page.getByTestId('fault-distance').textContent()) - 300)).toBeLessThan(1);
    await page.getByRole('button', { name: 'Confirm fault' }).click();
    await page.getByTestId('device-decision').waitFor();

    // Meanwhile a planner raises the run's VF to 0.70 from a field calibration.
    const planner = (await User.findOne({ where: { email: 'planner@example.com' } }))!;
    await updateCable(cable.id, { vf: 0.7, reason: 'Field calibration on HN-3' }, { userId: planner.id });

    await e2e.context.setOffline(false);
    await page.getByTestId('device-sent').waitFor({ timeout: 20_000 });
    const trace = (await Trace.findOne({ where: { originalName: 'hn3-before-calibration.csv' } }))!;
    // d = VF·c·t/2: the same round trip read with the new VF lies 0.70/VF_old as far.
    expect(trace.analysis!.events[0].distanceM / trace.deviceAnalysis!.events[0].distanceM).toBeCloseTo(0.7 / phoneVf, 3);
    // The confirmed event now sits outside the phone's window: nothing is guessed, it waits for the technician.
    await expect
      .poll(() => page.getByTestId('device-decision').textContent(), { timeout: 20_000 })
      .toMatch(/^Confirmed as a fault on this phone: not sent\. The server's analysis of trace \d+ has no matching event/);
    expect(await Finding.count({ where: { traceId: trace.id } })).toBe(0);
    await e2e.screenshot(page, 'offline-library-changed-phone');

    await page.goto(`${e2e.baseUrl}/traces/${trace.id}`);
    const both = page.getByTestId('device-comparison');
    await both.waitFor();
    expect(await page.getByText("The server's analysis differs from the phone's").isVisible()).toBe(true);
    expect(await both.locator('tr').filter({ hasText: 'Velocity factor' }).locator('td').allTextContents()).toEqual([
      String(phoneVf),
      '0.7',
    ]);
    await e2e.screenshot(page, 'offline-trace-compared-phone');
    await page.close();
  });
});

describe('the upload page opened with no signal', () => {
  it('lists the sites and cable runs kept on the phone, and hands what was chosen to the phone’s analysis', async () => {
    const run = (await CableRun.findOne({ where: { name: 'Control pair HN-C2' } }))!;
    const cable = (await CableType.findByPk(run.cableTypeId))!;
    const csv = stepTraceCsv({ faultM: 120, vf: cable.vf, samples: 4000 });
    const page = await e2e.pageAs('tech@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/device`);
    await page.getByTestId('field-data-age').waitFor();
    await offlineReady(page);

    await e2e.context.setOffline(true);
    await page.goto(`${e2e.baseUrl}/upload`);
    await page.getByTestId('upload-offline').waitFor();
    // The server's lists cannot load; the ones saved on the phone stand in, so the choice can still be made here.
    const site = page.getByLabel('Site');
    // The lists are read from the phone's storage after the page shows: wait for them before reading them.
    await site.locator('option', { hasText: 'Oakhollow cabinet row' }).waitFor({ state: 'attached' });
    expect(await site.locator('option').allTextContents()).toEqual([
      'Choose a site…',
      'Brookfold pumping station',
      'Harrowmere North substation',
      'Oakhollow cabinet row',
    ]);
    await site.selectOption({ label: 'Harrowmere North substation' });
    await page.getByLabel('Cable run').locator('option', { hasText: 'Feeder HN-3 to Ashby Lane' }).waitFor({ state: 'attached' });
    expect(await page.getByLabel('Cable run').locator('option').allTextContents()).toEqual([
      'Choose a cable run…',
      'Control pair HN-C2',
      'Feeder HN-3 to Ashby Lane',
    ]);
    await page.getByLabel('Cable run').selectOption({ label: 'Control pair HN-C2' });
    await page.getByRole('button', { name: /End B/ }).click();
    await page.getByLabel('Trace files').setInputFiles({ name: 'hc2-from-b.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
    await page.getByText('hc2-from-b.csv').waitFor();
    // Everything chosen, but sending needs the server: the button waits and says why, rather than fail when pressed.
    expect(await page.getByRole('button', { name: 'Upload and analyse' }).isDisabled()).toBe(true);
    expect(await page.getByTestId('upload-missing').textContent()).toBe(
      'Still needed: a signal to reach Rholog (or analyse the trace on this phone instead).',
    );
    // The way on stands under the grey button too, where the thumb is after choosing the file, as well as in the notice at the top.
    expect(await page.getByRole('link', { name: 'Analyse the trace on this phone' }).count()).toBe(2);
    const next = page.getByTestId('upload-offline-next').getByRole('link', { name: 'Analyse the trace on this phone' });
    const [buttonBox, nextBox] = [await page.getByRole('button', { name: 'Upload and analyse' }).boundingBox(), await next.boundingBox()];
    expect(nextBox!.y).toBeGreaterThan(buttonBox!.y);
    // Glove-sized: as tall as the upload button (56 px) and the phone's width less the page's margins.
    expect(nextBox!.height).toBeGreaterThanOrEqual(56);
    expect(nextBox!.width).toBe(buttonBox!.width);
    await e2e.screenshot(page, 'offline-upload-page-phone');

    // Taken to the phone's analysis with the same site, run, end and file: nothing to choose twice with gloves on.
    await next.click();
    await page.getByRole('heading', { name: 'Analyse on this phone' }).waitFor();
    expect(await page.getByLabel('Site').locator('option:checked').textContent()).toBe('Harrowmere North substation');
    expect(await page.getByLabel('Cable run').locator('option:checked').textContent()).toBe('Control pair HN-C2');
    expect(await page.getByRole('button', { name: /End B/ }).getAttribute('aria-pressed')).toBe('true');
    expect(await page.getByText('hc2-from-b.csv').isVisible()).toBe(true);
    expect(await page.getByTestId('device-analyse-missing').count()).toBe(0);
    await page.getByRole('button', { name: 'Analyse on this phone' }).click();
    await page.getByText('Analysed on this device, not yet uploaded').waitFor({ timeout: 20_000 });
    // d = VF·c·t/2 puts the open back at 120 m (the file was written from that distance).
    expect(Math.abs(number(await page.getByTestId('fault-distance').textContent()) - 120)).toBeLessThan(1);
    expect(await page.getByTestId('cable-window').textContent()).toMatch(/along the cable from end B/);
    await page.close();
  });
});
