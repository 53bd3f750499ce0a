import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ROLE_LABELS as ROLE_LABEL, ROLE_PERMISSIONS } from '../../shared/auth/permissions';
import { NAV } from '../../src/app/nav';
import { DEMO_USERS } from '../../server/db/demo/organisation';
import { hashPassword } from '../../server/auth/passwords';
import { User } from '../../server/db/models';
import { DESKTOP, PHONE, signIn, startE2E, type E2E } from './support/browser';

let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

const roles = ['technician', 'supervisor', 'planner', 'admin'] as const;

describe('the demo accounts on the sign-in page', () => {
  it('lists the demo accounts while the demo data is on, and one tap fills the form', async () => {
    const page = await e2e.newPage(PHONE);
    await page.goto(`${e2e.baseUrl}/sign-in`);
    const panel = page.getByTestId('demo-accounts');
    await panel.waitFor();
    expect(await panel.getByRole('button').allTextContents()).toEqual(DEMO_USERS.map((u) => `${u.email}${ROLE_LABEL[u.role]}`));
    await e2e.screenshot(page, 'sign-in-demo-accounts-phone');
    await panel.getByRole('button', { name: /^supervisor@example\.com/ }).click();
    expect(await page.getByLabel('E-mail').inputValue()).toBe('supervisor@example.com');
    expect(await page.getByLabel('Password').inputValue()).toBe('rholog-demo');
    await page.getByRole('button', { name: 'Sign in', exact: true }).click();
    await page.getByTestId('signed-in-name').first().waitFor({ state: 'attached' });
    await page.close();
  });
});

describe('signing in', () => {
  for (const role of roles) {
    it(`shows a ${role} their own navigation`, async () => {
      const user = DEMO_USERS.find((u) => u.role === role)!;
      const page = await e2e.pageAs(user.email, DESKTOP);
      const nav = page.locator('aside [data-testid="main-nav"] a');
      const labels = await nav.allTextContents();
      const expected = NAV.filter((i) => !i.permission || ROLE_PERMISSIONS[role].includes(i.permission)).map((i) => i.label);
      expect(labels).toEqual(expected);
      expect(await page.getByTestId('signed-in-name').first().textContent()).toBe(user.name);
      await e2e.screenshot(page, `home-${role}`);
      await page.close();
    });
  }

  it('keeps the start page’s safety caution as tall as its words beside a longer column on a wide screen', async () => {
    const page = await e2e.pageAs('supervisor@example.com', DESKTOP);
    const caution = page.getByRole('note', { name: 'Safety caution' });
    await caution.waitFor();
    // Stretched to the height of the open repairs and links beside it, it was a tall empty yellow box.
    const box = (await caution.boundingBox())!;
    const words = (await caution.locator('ul').boundingBox())!;
    expect(words.y + words.height).toBeGreaterThan(box.y + box.height - 40);
    await page.close();
  });

  it('refuses a wrong password with a clear message and stays on the sign-in page', async () => {
    const page = await e2e.newPage(PHONE);
    await signIn(page, e2e.baseUrl, 'tech@example.com', 'not-the-password');
    const alert = page.getByRole('alert');
    await alert.waitFor();
    expect(await alert.textContent()).toContain('The e-mail address or password is not right.');
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    await e2e.screenshot(page, 'sign-in-wrong-password');
    await page.close();
  });

  it('sends a signed-out visitor to sign-in and back to the page they asked for', async () => {
    const page = await e2e.newPage(PHONE);
    await page.goto(`${e2e.baseUrl}/account`);
    await page.waitForURL(/\/sign-in\?next=%2Faccount/);
    await page.getByLabel('E-mail').fill('admin@example.com');
    await page.getByLabel('Password').fill('rholog-demo');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { name: 'Your account' }).waitFor();
    expect(new URL(page.url()).pathname).toBe('/account');
    await page.close();
  });

  it('sends someone with a temporary password to choose their own before anything else', async () => {
    await User.create({ email: 'new.crew@example.com', name: 'New Crew', role: 'technician', passwordHash: await hashPassword('temporary-123'), mustChangePassword: true });
    const page = await e2e.newPage(PHONE);
    await signIn(page, e2e.baseUrl, 'new.crew@example.com', 'temporary-123');
    await page.getByText('Choose your own password').waitFor();
    expect(new URL(page.url()).pathname).toBe('/account');
    await page.goto(`${e2e.baseUrl}/upload`);
    await page.getByText('Choose your own password').waitFor();
    expect(new URL(page.url()).pathname).toBe('/account');
    await page.getByLabel('Current password').fill('temporary-123');
    await page.getByLabel('New password').fill('my-own-long-secret');
    await page.getByRole('button', { name: 'Change password' }).click();
    await page.getByText('Password changed.').waitFor();
    await page.goto(`${e2e.baseUrl}/`);
    await page.getByRole('link', { name: 'Upload a trace from site' }).waitFor();
    expect(new URL(page.url()).pathname).toBe('/');
    await page.close();
  });

  it('shows the not-allowed page to a role without the permission', async () => {
    const page = await e2e.pageAs('tech@example.com', PHONE);
    await page.goto(`${e2e.baseUrl}/admin/users`);
    await page.getByRole('heading', { name: 'Your role cannot open this page' }).waitFor();
    await e2e.screenshot(page, 'not-allowed-phone');
    await page.close();
  });
});
