import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Locator, Page } from 'playwright-core';
import { DESKTOP, PHONE, startE2E, type E2E } from './support/browser';

let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

const PLANNER = 'planner@example.com';

async function openCalculator(viewport: { width: number; height: number }) {
  const page = await e2e.pageAs(PLANNER, viewport);
  await page.goto(`${e2e.baseUrl}/cables/calculator`);
  await page.getByRole('heading', { name: 'VF calculator' }).waitFor();
  return page;
}

const card = (page: Page, title: string): Locator =>
  page.locator('section').filter({ has: page.getByRole('heading', { name: title, exact: true }) });

/** Every visible control in the page's main area, with its height in CSS pixels. */
async function controlHeights(page: Page) {
  return page.locator('main').evaluate((main) =>
    Array.from(main.querySelectorAll<HTMLElement>('a, button, input, select, textarea, summary'))
      .filter((el) => el.offsetParent !== null)
      .map((el) => ({
        what: `${el.tagName.toLowerCase()} “${(el.textContent || el.getAttribute('aria-label') || (el as HTMLInputElement).value || '').trim().slice(0, 40)}”`,
        height: el.getBoundingClientRect().height,
      })),
  );
}

describe('the VF calculator in the browser', () => {
  it('lets a planner derive a stripline’s VF and start a cable type that names the formula', async () => {
    const page = await openCalculator(DESKTOP);
    const strip = card(page, 'Stripline');
    // Pozar, Microwave Engineering, 4th ed., §3.7, Example 3.5: W = 0.266 cm, b = 0.32 cm, εr = 2.20 makes a 50 Ω stripline.
    await strip.getByLabel('Strip width W (mm)').fill('2.66');
    await strip.getByLabel('Plane-to-plane spacing b (mm)').fill('3.2');
    await strip.getByLabel('Strip thickness t (mm)').fill('0');
    await strip.getByLabel('Laminate εr').fill('2.2');
    const results = strip.getByTestId('calc-stripline');
    // A uniformly filled line: VF = 1/√2.2 = 0.6742, and v = 1/√(LC) equals c/√(εr·μr) = 202.1 m/µs.
    expect(await results.textContent()).toMatch(/Z0(49\.9|50\.0)\d* Ω/);
    expect(await results.textContent()).toContain('VF = v/c0.6742');
    expect(await results.textContent()).toContain('v = 1/√(LC)202.1 m/µs');
    expect(await results.textContent()).toContain('c/√(εr·μr)202.1 m/µs');
    await strip.getByText('Formula: Cohn’s exact thin-strip stripline formula').click();
    await strip.getByText(/Source:.*S\. B\. Cohn/).waitFor();

    // Out of the formula's range: refused, with the reason.
    await strip.getByLabel('Strip thickness t (mm)').fill('1');
    await strip.getByText(/t\/b is 0\.313: Cohn’s thick-strip formulas are used here only for t\/b below 0\.25/).waitFor();
    expect(await strip.getByRole('button', { name: 'Start a cable type with these values' }).count()).toBe(0);
    await strip.getByLabel('Strip thickness t (mm)').fill('0');

    await strip.getByRole('button', { name: 'Start a cable type with these values' }).click();
    await page.getByRole('heading', { name: 'New cable type' }).waitFor();
    const form = page.getByRole('form', { name: 'New cable type' });
    expect(await form.getByLabel('Velocity factor').inputValue()).toBe('0.6742');
    expect(await form.getByLabel('Reference for the VF').inputValue()).toContain('Cohn’s exact thin-strip stripline formula');
    expect(await form.getByLabel('Reference for the VF').inputValue()).toContain('W = 2.66 mm, b = 3.2 mm, t = 0 mm, εr = 2.2');
    await form.getByLabel('Name').fill('Fixture stripline, 50 Ω');
    await form.getByLabel('Dielectric').fill('PTFE laminate, εr 2.2');
    await form.getByRole('button', { name: 'Add to the library' }).click();

    await page.getByRole('heading', { name: 'Fixture stripline, 50 Ω', exact: true }).waitFor();
    expect(await page.getByTestId('cable-vf').textContent()).toBe('0.6742');
    await page
      .getByText(/Calculated with Cohn’s exact thin-strip stripline formula/)
      .first()
      .waitFor();
    await page
      .getByText(/Source: S\. B\. Cohn, “Characteristic impedance of the shielded-strip transmission line”/)
      .first()
      .waitFor();
    await e2e.screenshot(page, 'calculator-stripline-entry');
    await page.close();
  });

  it('refuses a result faster than light from L and C, and offers nothing to the library', async () => {
    const page = await openCalculator(DESKTOP);
    const lc = card(page, 'From inductance and capacitance');
    // 250 nH/m with 1 pF/m (a coax's 100 pF/m mistyped): 1/√(LC) = 2e9 m/s, VF 6.671.
    await lc.getByLabel('Inductance L (nH/m)').fill('250');
    await lc.getByLabel('Capacitance C (pF/m)').fill('1');
    expect(await lc.getByTestId('calc-lc-check').textContent()).toContain('VF 6.671 would be faster than light');
    expect(await lc.getByTestId('calc-lc').count()).toBe(0);
    expect(await lc.getByRole('button', { name: 'Start a cable type with these values' }).count()).toBe(0);
    // A coax's usual 100 pF/m: VF 0.6671, no warning, offered.
    await lc.getByLabel('Capacitance C (pF/m)').fill('100');
    expect(await lc.getByTestId('calc-lc').textContent()).toContain('VF0.6671');
    expect(await lc.getByTestId('calc-lc-check').count()).toBe(0);
    await lc.getByRole('button', { name: 'Start a cable type with these values' }).waitFor();

    // Bare wire in air is the speed of light: shown, with a warning that real lines are slower.
    const twoWire = card(page, 'Two-wire line');
    expect(await twoWire.getByTestId('calc-two-wire-check').textContent()).toContain(
      'VF 1 is the speed of light in vacuum or air',
    );
    await page.close();
  });

  it('keeps every control at least 44 px tall, on a phone and on a desktop', async () => {
    for (const [viewport, name] of [
      [PHONE, 'phone'],
      [DESKTOP, 'desktop'],
    ] as const) {
      const page = await openCalculator(viewport);
      const twisted = card(page, 'Twisted pair');
      await twisted.getByLabel('Insulation', { exact: true }).selectOption('twist');
      await twisted.getByLabel('Lay length, one full twist (mm)').waitFor();
      for (const summary of await page.locator('main summary').all()) await summary.click();
      const controls = await controlHeights(page);
      expect(controls.length).toBeGreaterThan(60); // the nine cards' fields, selects, formula notes and buttons
      expect(controls.filter((c) => c.height < 44)).toEqual([]);
      // Nothing wider than the screen on a phone.
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
      expect(overflow).toBeLessThanOrEqual(0);
      await e2e.screenshot(page, `calculator-${name}`);
      await page.close();
    }
  });

  it('works in inches and feet for a planner who reads lengths in feet', async () => {
    const page = await e2e.pageAs(PLANNER, PHONE);
    await page.goto(`${e2e.baseUrl}/account`);
    await Promise.all([
      page.waitForResponse((r) => r.request().method() !== 'GET' && r.ok()),
      page.getByLabel('Show lengths in').selectOption('ft'),
    ]);
    try {
      await page.goto(`${e2e.baseUrl}/cables/calculator`);
      await page.getByRole('heading', { name: 'VF calculator' }).waitFor();
      const strip = card(page, 'Stripline');
      // Pozar's 50 Ω example in inches: W = 0.266 cm = 0.1047 in, b = 0.32 cm = 0.126 in (1 in = 2.54 cm exactly).
      expect(await strip.getByLabel('Strip width W (in)').inputValue()).toBe('0.1047');
      const text = (await strip.getByTestId('calc-stripline').textContent()) ?? '';
      expect(text).toMatch(/Z0(49\.9|50\.0)\d* Ω/);
      // c/√2.2 = 202.12 m/µs = 663.1 ft/µs; per-length values per foot.
      expect(text).toContain('c/√(εr·μr)663.1 ft/µs');
      expect(text).toMatch(/L\d+(\.\d+)? nH\/ft/);
      expect(text).toContain('s²/ft²');
      expect(text).not.toMatch(/\/m\b|m\/µs|mm|m²/);
      for (const title of ['Twisted pair', 'Shielded pair', 'Two dielectrics']) {
        const c = card(page, title);
        expect(await c.locator('[data-testid^="calc-"]').first().textContent()).toContain('ft/µs');
        expect(await c.getByText(/\(mm\)/).count()).toBe(0);
      }
      await e2e.screenshot(page, 'calculator-phone-feet');
    } finally {
      await page.goto(`${e2e.baseUrl}/account`);
      await Promise.all([
        page.waitForResponse((r) => r.request().method() !== 'GET' && r.ok()),
        page.getByLabel('Show lengths in').selectOption('m'),
      ]);
      await page.close();
    }
  });
});
