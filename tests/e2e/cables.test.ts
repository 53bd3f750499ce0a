import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DESKTOP, PHONE, startE2E, type E2E } from './support/browser';

let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

const PLANNER = 'planner@example.com';
const TECH = 'tech@example.com';
const ENTRY = 'Solid PE coax, 50 Ω';

async function openEntry(page: import('playwright-core').Page, name: string) {
  await page.getByRole('link', { name: 'Cable library' }).first().click();
  await page.getByRole('heading', { name: 'Cable library' }).waitFor();
  await page.getByRole('link', { name, exact: true }).waitFor();
  await e2e.screenshot(page, `cables-list-${page.viewportSize()!.width}`);
  await page.getByLabel('Search by name, dielectric, construction or reference').fill(name);
  await page.getByRole('link', { name, exact: true }).click();
  await page.getByRole('heading', { name, exact: true }).waitFor();
}

describe('the cable library in the browser', () => {
  it('lets a planner edit a VF with a reason and see it in the history', async () => {
    const page = await e2e.pageAs(PLANNER, DESKTOP);
    await openEntry(page, ENTRY);
    expect(await page.getByTestId('cable-vf').textContent()).toBe('0.6600');

    await page.getByRole('button', { name: 'Edit' }).click();
    const form = page.getByRole('form', { name: `Edit ${ENTRY}` });
    await form.getByLabel('Velocity factor').fill('0.667');
    await form.getByRole('button', { name: 'Save the change' }).click();
    // No reason yet: the form says so and nothing is sent.
    await form.getByText('is required: say why (at least 3 characters)').waitFor();
    await form.getByLabel('Reason for the change').fill('Measured on the yard drum, 305 m');
    await form.getByRole('button', { name: 'Save the change' }).click();

    await page.getByTestId('cable-values').waitFor();
    expect(await page.getByTestId('cable-vf').textContent()).toBe('0.6670');
    const latest = page.getByTestId('history-entry').first();
    await latest.getByText('Measured on the yard drum, 305 m').waitFor();
    expect(await latest.textContent()).toContain('Priya Castellanos');
    expect(await latest.textContent()).toContain('Velocity factor: 0.6600 → 0.6670');
    expect(await page.getByTestId('history-entry').count()).toBe(2);
    await e2e.screenshot(page, 'cable-entry-planner');
    await page.close();
  });

  it('keeps a planner from overwriting a VF someone else saved while the form was open', async () => {
    const page = await e2e.pageAs(PLANNER, DESKTOP);
    // An entry of this test's own, so the other tests' edits do not matter.
    const id = await page.evaluate(async () => {
      const csrf = (await (await fetch('/api/auth/csrf')).json()).csrfToken as string;
      const res = await fetch('/api/cables', {
        method: 'POST',
        headers: { 'content-type': 'application/json', 'x-csrf-token': csrf },
        body: JSON.stringify({
          name: 'Foam PE drop coax, 75 Ω',
          construction: 'coax',
          dielectric: 'foamed polyethylene',
          z0Ohm: 75,
          vf: 0.82,
          vfTolerance: 0.02,
          vfSource: 'handbook',
          vfReference: 'Foamed PE, typical VF 0.80–0.85 (common practice)',
        }),
      });
      return ((await res.json()) as { id: number }).id;
    });
    await page.goto(`${e2e.baseUrl}/cables/${id}`);
    await page.getByRole('button', { name: 'Edit' }).click();
    const form = page.getByRole('form', { name: 'Edit Foam PE drop coax, 75 Ω' });
    await form.getByLabel('Velocity factor').fill('0.83');
    await form.getByLabel('Reason for the change').fill('Yard drum, 200 m');

    // Meanwhile another planner saves VF 0.84.
    await page.evaluate(async (cableId) => {
      const csrf = (await (await fetch('/api/auth/csrf')).json()).csrfToken as string;
      await fetch(`/api/cables/${cableId}`, {
        method: 'PATCH',
        headers: { 'content-type': 'application/json', 'x-csrf-token': csrf },
        body: JSON.stringify({ vf: 0.84, reason: 'Second drum' }),
      });
    }, id);
    await form.getByRole('button', { name: 'Save the change' }).click();
    await page.getByText('Your change was not saved: someone else saved this entry after you opened it.').waitFor();
    await page.getByText('is now 0.84; you started from 0.82').waitFor();
    // Their change shows in the history beside the open form.
    await page.getByTestId('history-entry').first().getByText('Second drum').waitFor();
    await e2e.screenshot(page, 'cable-entry-changed-meanwhile');
    // The refused change is still in the form, so nothing typed is lost before starting again.
    expect(await form.getByLabel('Velocity factor').inputValue()).toBe('0.83');
    await page.getByRole('button', { name: 'Start again from the saved values' }).click();
    await page.getByText('Your change was not saved').waitFor({ state: 'detached' });
    expect(await form.getByLabel('Velocity factor').inputValue()).toBe('0.84');
    const stored = await page.evaluate(async (cableId) => ((await (await fetch(`/api/cables/${cableId}`)).json()) as { vf: number }).vf, id);
    expect(stored).toBe(0.84);
    await page.close();
  });

  it('does not let a technician edit, but lets them send a calibration', async () => {
    const page = await e2e.pageAs(TECH, PHONE);
    await page.goto(`${e2e.baseUrl}/cables`);
    await page.getByRole('heading', { name: 'Cable library' }).waitFor();
    expect(await page.getByRole('link', { name: 'New cable type' }).count()).toBe(0);
    expect(await page.getByRole('link', { name: 'Import CSV' }).count()).toBe(0);
    await page.getByRole('link', { name: ENTRY, exact: true }).waitFor();
    await e2e.screenshot(page, 'cables-list-technician-phone');
    await page.getByLabel('Search by name, dielectric, construction or reference').fill(ENTRY);
    await page.getByRole('link', { name: ENTRY, exact: true }).click();
    await page.getByRole('heading', { name: ENTRY, exact: true }).waitFor();
    expect(await page.getByRole('button', { name: 'Edit' }).count()).toBe(0);

    // The server refuses the edit too, whatever the page shows.
    const status = await page.evaluate(async () => {
      const csrf = (await (await fetch('/api/auth/csrf')).json()).csrfToken as string;
      const list = await (await fetch('/api/cables?q=Solid%20PE%20coax%2C%2050')).json();
      const res = await fetch(`/api/cables/${list.items[0].id}`, {
        method: 'PATCH',
        headers: { 'content-type': 'application/json', 'x-csrf-token': csrf },
        body: JSON.stringify({ vf: 0.7, reason: 'trying' }),
      });
      return res.status;
    });
    expect(status).toBe(403);

    // 120 m of cable at VF 0.66 takes 2·120/(0.66·c) = 1212.9 ns there and back (c exact by the SI).
    const form = page.getByRole('form', { name: 'Record a field calibration' });
    await form.getByLabel('Known length (m)').fill('120');
    await form.getByLabel('Round-trip time of its end reflection (ns)').fill('1212.9');
    expect(await page.getByTestId('calibration-vf').textContent()).toContain('VF = 2L / (c·t) = 0.6600');
    await form.getByLabel('Note (optional)').fill('As-built length, feeder from cabinet 4');
    await form.getByRole('button', { name: 'Send for review' }).click();
    await form.getByText('is in the planners’ queue').waitFor();
    await page.getByText('Over the 0 accepted and 1 pending calibrations').waitFor();
    await e2e.screenshot(page, 'cable-entry-technician-phone');

    await page.goto(`${e2e.baseUrl}/cables/new`);
    await page.getByRole('heading', { name: 'Your role cannot open this page' }).waitFor();
    await page.goto(`${e2e.baseUrl}/calibrations`);
    await page.getByRole('heading', { name: 'Your role cannot open this page' }).waitFor();
    await page.close();
  });

  it('lets the planner accept the calibration, which becomes the library VF', async () => {
    const page = await e2e.pageAs(PLANNER, DESKTOP);
    await page.getByRole('link', { name: 'Calibrations' }).first().click();
    await page.getByRole('heading', { name: 'Calibrations' }).waitFor();
    const item = page.locator('[data-testid^="calibration-"]').filter({ hasText: 'As-built length, feeder from cabinet 4' });
    await item.waitFor();
    expect(await item.textContent()).toContain('Ines Ravelo');
    await e2e.screenshot(page, 'calibrations-queue');
    await item.getByLabel('Note (optional)').fill('Matches the as-built');
    await item.getByRole('button', { name: 'Accept into the library' }).click();
    // Decided, it leaves the queue (other calibrations may still be waiting).
    await item.waitFor({ state: 'detached' });

    await openEntry(page, ENTRY);
    expect(await page.getByTestId('cable-vf').textContent()).toBe('0.6600');
    const latest = page.getByTestId('history-entry').first();
    expect(await latest.textContent()).toContain('Calibration accepted');
    expect(await latest.textContent()).toContain('Velocity factor: 0.6670 → 0.6600');
    await page.getByText(/Over the 1 accepted and \d+ pending calibrations/).waitFor();
    await e2e.screenshot(page, 'cable-entry-after-calibration');
    await page.close();
  });

  it('works out VF and Z0 as the planner types, and checks an import row by row', async () => {
    const page = await e2e.pageAs(PLANNER, DESKTOP);
    await page.goto(`${e2e.baseUrl}/cables/calculator`);
    await page.getByRole('heading', { name: 'VF calculator' }).waitFor();
    // PTFE εr 2.1 → VF 0.6901 (Standard Wire & Cable dielectric table: TFE 2.1, 69 %).
    await page.getByLabel('Relative permittivity εr').fill('2.1');
    expect(await page.getByTestId('calc-permittivity').textContent()).toContain('VF0.6901');
    await page.getByLabel('Relative permittivity εr').fill('0.5');
    await page.getByText('The relative permittivity εr must be at least 1 (vacuum is 1).').waitFor();
    // The common 75 Ω solid-PE family: d 0.58 mm, D 3.7 mm (Wikipedia coaxial cable table) → about 74 Ω.
    await page.getByLabel('Dielectric diameter D (mm)').fill('3.7');
    await page.getByLabel('Inner conductor d (mm)').fill('0.58');
    const coaxText = await page.getByTestId('calc-coax').textContent();
    expect(coaxText).toMatch(/Z0(73|74)\.\d+ Ω/);
    await e2e.screenshot(page, 'cable-calculator');

    await page.goto(`${e2e.baseUrl}/cables/import`);
    await page.getByRole('heading', { name: 'Import the cable library' }).waitFor();
    const csv = [
      'name,construction,dielectric,z0_ohm,vf,vf_tolerance,attenuation_db_per_100m,attenuation_freq_mhz,vf_source,vf_reference,notes',
      'Yard foam coax,coax,foamed PE,75,0.84,0.03,,,datasheet,Drum label,',
      'Yard bad pair,twisted-pair,PVC,100,66,0.05,,,handbook,Handbook,',
      'Yard PTFE coax,coax,PTFE,50,0.695,0.01,,,handbook,Handbook,',
    ].join('\n');
    await page.getByLabel('CSV file').setInputFiles({ name: 'yard.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
    await page.getByTestId('import-counts').waitFor();
    expect(await page.getByTestId('import-counts').textContent()).toBe('2 new · 0 with changes · 0 unchanged · 1 with errors');
    expect(await page.getByTestId('import-row-3').textContent()).toContain('vf 66 must be at most 1: write the VF as a fraction (0.66), not a percentage');
    expect(await page.getByRole('button', { name: 'Import 2 rows' }).isDisabled()).toBe(true);
    await e2e.screenshot(page, 'cable-import-bad-row');
    await page.close();
  });
});
