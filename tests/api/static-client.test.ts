import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import express from 'express';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { IMMUTABLE, staticClient } from '../../server/static-client';

let dist: string;
const script = `export const rows = [${Array.from({ length: 400 }, (_, i) => `'row ${i}'`).join(', ')}];\n`;

beforeAll(() => {
  dist = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-static-'));
  fs.mkdirSync(path.join(dist, 'assets'));
  fs.writeFileSync(path.join(dist, 'assets', 'index-Bx7k2QmA.js'), script);
  fs.writeFileSync(path.join(dist, 'index.html'), `<!doctype html><title>Rholog</title>${'<!-- padding -->'.repeat(100)}`);
  fs.writeFileSync(path.join(dist, 'sw.js'), script);
});
afterAll(() => fs.rmSync(dist, { recursive: true, force: true }));

function app() {
  return express().use(staticClient(dist));
}

describe('the built client', () => {
  it('serves hashed assets compressed and immutable for a year', async () => {
    const res = await supertest(app()).get('/assets/index-Bx7k2QmA.js').set('Accept-Encoding', 'gzip').expect(200);
    expect(res.headers['content-encoding']).toBe('gzip');
    expect(res.headers['cache-control']).toBe(IMMUTABLE);
    expect(IMMUTABLE).toBe('public, max-age=31536000, immutable');
    expect(res.text).toBe(script);
  });

  it('sends the asset uncompressed to a client that asks for no encoding', async () => {
    const res = await supertest(app()).get('/assets/index-Bx7k2QmA.js').set('Accept-Encoding', 'identity').expect(200);
    expect(res.headers['content-encoding']).toBeUndefined();
    expect(Number(res.headers['content-length'])).toBe(Buffer.byteLength(script));
  });

  it('makes the browser revalidate index.html, the service worker and client routes', async () => {
    const sw = await supertest(app()).get('/sw.js').expect(200);
    expect(sw.headers['cache-control']).toBe('no-cache');
    const route = await supertest(app()).get('/traces/12').set('Accept-Encoding', 'gzip').expect(200);
    expect(route.headers['cache-control']).toBe('no-cache');
    expect(route.headers['content-encoding']).toBe('gzip');
    expect(route.text).toMatch(/^<!doctype html><title>Rholog<\/title>/);
  });
});
