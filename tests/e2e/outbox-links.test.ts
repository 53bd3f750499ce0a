import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Finding, OutboxMessage } from '../../server/db/models';
import { DESKTOP, PHONE, startE2E, type E2E } from './support/browser';

let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

describe('a supervisor reading the mail Rholog sent them', () => {
  it('finds it under Outbox, and a link in the formatted message opens the finding in the app', async () => {
    const finding = (await Finding.findOne({ where: { status: 'confirmed' }, order: [['id', 'ASC']] }))!;
    const subject = `Fault confirmed: finding ${finding.id}`;
    await e2e.app.ctx.mail.queue.enqueue({
      kind: 'test',
      to: ['supervisor@example.com'],
      subject,
      text: `Open the finding: ${e2e.baseUrl}/findings/${finding.id}`,
      html: `<p>A fault was confirmed.</p><p><a href="${e2e.baseUrl}/findings/${finding.id}">Open the finding</a></p>`,
    });
    await expect.poll(() => OutboxMessage.count({ where: { subject } }), { timeout: 10_000 }).toBe(1);

    const page = await e2e.pageAs('supervisor@example.com', PHONE);
    await page.getByRole('button', { name: 'Menu' }).click();
    await page.getByRole('link', { name: 'Outbox' }).first().click();
    const list = page.getByTestId('outbox-list');
    await list.getByRole('button', { name: new RegExp(subject) }).waitFor();
    // Only mail to this supervisor: every message in the list is addressed to them.
    const recipients = await list.locator('li button span.text-xs').allTextContents();
    expect(recipients.length).toBeGreaterThan(1);
    expect(recipients.every((r) => r.startsWith('supervisor@example.com ·'))).toBe(true);
    await list.getByRole('button', { name: new RegExp(subject) }).click();
    // On a phone the formatted part shows first.
    const frame = page.frameLocator('iframe[title="Formatted message"]');
    await frame.getByRole('link', { name: 'Open the finding' }).click();
    await page.waitForURL(`${e2e.baseUrl}/findings/${finding.id}`);
    // The app itself, in the same tab: the finding's own page, not a blocked frame.
    await page.getByRole('heading', { name: new RegExp(`^Finding ${finding.id}: `) }).waitFor();
    expect(page.frames()).toHaveLength(1);
    await e2e.screenshot(page, 'outbox-link-finding-phone');
    await page.close();
  });

  it('keeps the send queue and every message for administrators', async () => {
    const page = await e2e.pageAs('admin@example.com', DESKTOP);
    await page.locator('aside').getByRole('link', { name: 'Outbox' }).click();
    await page.getByRole('heading', { name: 'Send queue' }).waitFor();
    await page.getByTestId('outbox-list').waitFor();
    const recipients = await page.getByTestId('outbox-list').locator('li button span.text-xs').allTextContents();
    expect(recipients.some((r) => !r.startsWith('supervisor@example.com'))).toBe(true);
    await page.close();
  });

  it('wraps a long line of a plain-text message inside its box on a desktop, keeping the lines it was written in', async () => {
    const subject = 'Plain text with a long line';
    const link = `${e2e.baseUrl}/findings/1?from=mail&reference=${'HN3-feeder-substation-bay-3-'.repeat(6)}end`;
    const text = ['Finding 1 was confirmed.', '', `Open it: ${link}`, 'Last line.'].join('\n');
    await e2e.app.ctx.mail.queue.enqueue({ kind: 'test', to: ['planner@example.com'], subject, text });
    await expect.poll(() => OutboxMessage.count({ where: { subject } }), { timeout: 10_000 }).toBe(1);

    const page = await e2e.pageAs('admin@example.com', DESKTOP);
    await page.goto(`${e2e.baseUrl}/outbox`);
    await page
      .getByTestId('outbox-list')
      .getByRole('button', { name: new RegExp(subject) })
      .click();
    const body = page.getByTestId('outbox-body');
    await body.getByText('Last line.').waitFor();
    const seen = await body.evaluate((el) => {
      const text = el.firstChild!;
      // Where a piece of the text sits on screen.
      const at = (piece: string) => {
        const start = text.textContent!.indexOf(piece);
        const range = document.createRange();
        range.setStart(text, start);
        range.setEnd(text, start + piece.length);
        return range.getBoundingClientRect();
      };
      const box = el.getBoundingClientRect();
      const end = at('end\nLast');
      return {
        scrollWidth: el.scrollWidth,
        clientWidth: el.clientWidth,
        right: box.right,
        first: at('Finding').top,
        open: at('Open it').top,
        last: at('Last line').top,
        linkEnd: end.top,
        linkEndRight: end.right,
        text: el.textContent!.trimEnd(),
      };
    });
    expect(seen.text).toBe(text);
    expect(seen.scrollWidth).toBeLessThanOrEqual(seen.clientWidth);
    expect(seen.linkEndRight).toBeLessThanOrEqual(seen.right);
    // The empty line and the breaks are kept: each line starts lower than the one before, and the long one takes more than one row.
    expect(seen.open).toBeGreaterThan(seen.first);
    expect(seen.linkEnd).toBeGreaterThan(seen.open);
    expect(seen.last).toBeGreaterThan(seen.linkEnd);
    await page.close();
  });
});
