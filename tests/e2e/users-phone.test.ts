import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PHONE, startE2E, type E2E } from './support/browser';

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
    await e2e.screenshot(page, 'users-temporary-password-phone');

    const theirs = await e2e.pageAs('noor@example.com', PHONE, password);
    expect(await theirs.getByTestId('signed-in-name').first().textContent()).toContain('Noor Haddad');
  });
});
