import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DESKTOP, PHONE, startE2E, type E2E } from './support/browser';

let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

describe('an administrator on a phone', () => {
  it('sees the temporary password of the account just created without scrolling up to find it, and it signs the person in', async () => {
    const page = await e2e.pageAs('admin@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/admin/users`);
    await page.getByText('tech2@example.com').waitFor();
    // The form to add a person is on the first screen, above the list of people, not below every one of them.
    const add = (await page.getByRole('heading', { name: 'Add a person' }).boundingBox())!;
    const people = (await page.getByRole('heading', { name: 'People' }).boundingBox())!;
    expect(add.y).toBeLessThan(people.y);
    expect(add.y + add.height).toBeLessThan(PHONE.height);
    const create = (await page.getByRole('button', { name: 'Create account' }).boundingBox())!;
    expect(create.y).toBeLessThan(people.y);
    await page.getByRole('textbox', { name: 'Name', exact: true }).fill('Noor Haddad');
    await page.getByRole('textbox', { name: 'E-mail', exact: true }).fill('noor@example.com');
    await page.getByRole('button', { name: 'Create account' }).click();

    const notice = page.getByRole('status').filter({ hasText: 'Temporary password' });
    await notice.waitFor();
    await expect
      .poll(async () => {
        const box = await notice.boundingBox();
        // Wholly on the 844 px screen (below the 60 px top bar), where the button was pressed.
        return !!box && box.y >= 56 && box.y + box.height <= PHONE.height;
      })
      .toBe(true);
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('users-said');
    expect(await notice.textContent()).toContain('Give noor@example.com this password');
    const password = (await notice.locator('code').textContent())!;
    // Its own button copies it: the phone's clipboard holds the password, and the button says so.
    await page.context().grantPermissions(['clipboard-read', 'clipboard-write'], { origin: e2e.baseUrl });
    const copy = notice.getByRole('button', { name: 'Copy the password' });
    expect((await copy.boundingBox())!.height).toBeGreaterThanOrEqual(44);
    await copy.click();
    await expect.poll(() => notice.getByTestId('copy-state').textContent()).toBe('Copied');
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(password);
    await e2e.screenshot(page, 'users-temporary-password-phone');

    const theirs = await e2e.pageAs('noor@example.com', PHONE, password);
    expect(await theirs.getByTestId('signed-in-name').first().textContent()).toContain('Noor Haddad');
  });

  it('keeps "Add a person" beside the list on a wide screen', async () => {
    const page = await e2e.pageAs('admin@example.com', DESKTOP);
    await page.goto(`${e2e.baseUrl}/admin/users`);
    await page.getByText('tech2@example.com').waitFor();
    const add = (await page.getByRole('heading', { name: 'Add a person' }).boundingBox())!;
    const people = (await page.getByRole('heading', { name: 'People' }).boundingBox())!;
    // The list on the left, the form to its right, their headings on one line.
    expect(add.x).toBeGreaterThan(people.x + people.width);
    expect(Math.abs(add.y - people.y)).toBeLessThan(2);
  });
});
