import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import supertest from 'supertest';
import { createApp, type RhologApp } from '../../../server/app';
import { freshDatabase, testConfig } from '../../support/test-config';
import { CHROMIUM_ARGS, CHROMIUM_PATH } from './chromium';
import type { AppConfig } from '../../../server/config';

export interface E2E {
  baseUrl: string;
  app: RhologApp;
  context: BrowserContext;
  newPage: (viewport?: { width: number; height: number }) => Promise<Page>;
  /** A new page signed in as `email` (the demo password unless given), once the signed-in layout is there. */
  pageAs: (email: string, viewport?: { width: number; height: number }, password?: string) => Promise<Page>;
  /** An API client signed in as `email`, with the CSRF token its changes carry, for setting a scene. */
  agentAs: (email: string) => Promise<{ agent: ReturnType<typeof supertest.agent>; token: string }>;
  screenshot: (page: Page, name: string) => Promise<string>;
  stop: () => Promise<void>;
}

export const PHONE = { width: 390, height: 844 };
export const DESKTOP = { width: 1366, height: 900 };
export const SCREENSHOT_DIR = path.resolve('tests/e2e/screenshots');

/** The built client served by the real server on a fresh demo database, and Debian's Chromium driving it. */
export async function startE2E(overrides: Partial<AppConfig> = {}): Promise<E2E> {
  const db = await freshDatabase();
  const app = await createApp(testConfig(db.url, db.dir, { client: 'static', demoData: true, ...overrides }));
  let server: Server | undefined;
  let context: BrowserContext | undefined;
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-chromium-'));
  try {
    server = await new Promise<Server>((resolve) => {
      const s = app.app.listen(0, '127.0.0.1', () => resolve(s));
    });
    const baseUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    context = await chromium.launchPersistentContext(profile, {
      executablePath: CHROMIUM_PATH,
      headless: true,
      args: CHROMIUM_ARGS,
    });
    const ctx = context;
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    const srv = server;
    const newPage = async (viewport = DESKTOP) => {
      // One signed-in person at a time: a new page starts signed out.
      await ctx.clearCookies();
      const page = await ctx.newPage();
      await page.setViewportSize(viewport);
      return page;
    };
    return {
      baseUrl,
      app,
      context: ctx,
      newPage,
      pageAs: async (email, viewport = DESKTOP, password) => {
        const page = await newPage(viewport);
        await signIn(page, baseUrl, email, password);
        // Attached, not visible: on a phone the name sits in the closed menu.
        await page.getByTestId('signed-in-name').first().waitFor({ state: 'attached' });
        return page;
      },
      agentAs: async (email) => {
        const agent = supertest.agent(app.app);
        const csrf = (await agent.get('/api/auth/csrf')).body.csrfToken as string;
        const login = await agent
          .post('/api/auth/login')
          .set('x-csrf-token', csrf)
          .send({ email, password: 'rholog-demo' })
          .expect(200);
        return { agent, token: login.body.csrfToken as string };
      },
      screenshot: async (page, name) => {
        const file = path.join(SCREENSHOT_DIR, `${name}.png`);
        await page.screenshot({ path: file, fullPage: true });
        return file;
      },
      stop: async () => {
        await ctx.close().catch(() => undefined);
        await new Promise<void>((resolve) => srv.close(() => resolve()));
        await app.close();
        await db.cleanup();
        fs.rmSync(profile, { recursive: true, force: true });
      },
    };
  } catch (err) {
    await context?.close().catch(() => undefined);
    if (server) await new Promise<void>((resolve) => server!.close(() => resolve()));
    await app.close();
    await db.cleanup();
    throw err;
  }
}

export async function signIn(page: Page, baseUrl: string, email: string, password = 'rholog-demo') {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

/** The number in a shown text, its other characters dropped ("260.4 m" → 260.4). */
export const numberIn = (s: string | null) => Number((s ?? '').replace(/[^\d.]/g, ''));
