import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import viteConfig from '../../../vite.config';
import { exposureWarnings, hardenFiles } from '../../../server/startup';

describe('exposureWarnings', () => {
  it('says nothing without demo data', () => {
    expect(exposureWarnings({ demoData: false, host: '0.0.0.0' })).toEqual([]);
  });

  it('warns that the demo passwords are published whenever demo data is on', () => {
    const w = exposureWarnings({ demoData: true, host: '127.0.0.1' });
    expect(w).toHaveLength(1);
    expect(w[0]).toMatch(/^Demo data is on: the demo accounts and their password are published in the README\./);
  });

  it('warns again when demo data is on and the server listens beyond this machine', () => {
    const w = exposureWarnings({ demoData: true, host: '0.0.0.0' });
    expect(w).toHaveLength(2);
    expect(w[1]).toBe('HOST=0.0.0.0 makes the demo accounts reachable from other machines; while demo data is on, leave HOST unset (127.0.0.1).');
    expect(exposureWarnings({ demoData: true, host: '::1' })).toHaveLength(1);
  });
});

describe('the client build', () => {
  it('writes no source maps (the full source would be public)', () => {
    expect(viteConfig.build?.sourcemap).toBe(false);
  });
});

describe('hardenFiles', () => {
  const mode = (p: string) => fs.statSync(p).mode & 0o7777;

  it('closes its own folders and the database file to other users', () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-harden-'));
    const uploads = path.join(dir, 'uploads');
    fs.mkdirSync(uploads, { mode: 0o755 });
    fs.chmodSync(dir, 0o755);
    fs.writeFileSync(path.join(dir, 'rholog.db'), '', { mode: 0o644 });
    hardenFiles({ databaseUrl: `sqlite:${path.join(dir, 'rholog.db')}`, uploadDir: uploads });
    expect(mode(path.join(dir, 'rholog.db'))).toBe(0o600);
    expect(mode(dir)).toBe(0o750);
    expect(mode(uploads)).toBe(0o750);
    fs.rmSync(dir, { recursive: true });
  });

  it('leaves a folder shared by everyone (sticky bit, like /tmp) exactly as it is, and still closes the database file', () => {
    const shared = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-shared-'));
    fs.chmodSync(shared, 0o1777);
    fs.writeFileSync(path.join(shared, 'rholog.db'), '', { mode: 0o644 });
    const warnings: string[] = [];
    const logger = { warn: (_o: object, msg: string) => warnings.push(msg), debug: () => {} };
    hardenFiles({ databaseUrl: `sqlite:${path.join(shared, 'rholog.db')}`, uploadDir: shared }, logger as never);
    expect(mode(shared)).toBe(0o1777);
    expect(mode(path.join(shared, 'rholog.db'))).toBe(0o600);
    expect(warnings).toHaveLength(2);
    expect(warnings[0]).toMatch(/^the database sits in a folder shared with others/);
    fs.rmSync(shared, { recursive: true });
  });
});
