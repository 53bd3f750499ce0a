/**
 * Draw Rholog's app icons as PNG from the SVGs in scripts/app-icons, with Debian's
 * Chromium (the same one the browser tests use): the sizes a phone asks the
 * web manifest for, a full-bleed one for round and squircle masks, and the
 * 180 px icon a home screen on iOS takes. Run after changing an SVG:
 *   npx tsx scripts/make-app-icons.ts
 */
import fs from 'node:fs';
import path from 'node:path';
import { chromium } from 'playwright-core';

const SOURCES = path.resolve('scripts/app-icons');
const DIR = path.resolve('public/icons');
const OUT: Array<{ svg: string; png: string; size: number }> = [
  { svg: 'rholog-app-rounded.svg', png: 'rholog-192.png', size: 192 },
  { svg: 'rholog-app-rounded.svg', png: 'rholog-512.png', size: 512 },
  { svg: 'rholog-app.svg', png: 'rholog-maskable-512.png', size: 512 },
  { svg: 'rholog-app.svg', png: 'rholog-apple-touch-180.png', size: 180 },
];

const browser = await chromium.launch({
  executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
  headless: true,
  args: ['--headless', '--no-sandbox', '--disable-gpu'],
});
try {
  const page = await browser.newPage();
  for (const o of OUT) {
    const svg = fs.readFileSync(path.join(SOURCES, o.svg), 'utf8');
    await page.setViewportSize({ width: o.size, height: o.size });
    await page.setContent(
      `<html><body style="margin:0;background:transparent">${svg.replace('<svg ', `<svg width="${o.size}" height="${o.size}" `)}</body></html>`,
    );
    await page.screenshot({
      path: path.join(DIR, o.png),
      omitBackground: true,
      clip: { x: 0, y: 0, width: o.size, height: o.size },
    });
    console.log(`${o.png} ${o.size}×${o.size}`);
  }
} finally {
  await browser.close();
}
