import { spawnSync } from 'node:child_process';
import {
  copyFileSync,
  existsSync,
  mkdirSync,
  mkdtempSync,
  readdirSync,
  readFileSync,
  rmSync,
  statSync,
  symlinkSync,
  utimesSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

const root = join(__dirname, '../../..');
const ref = join(root, 'tests/fixtures/traces/reference/pe-coax-7m-25ohm.csv');

/**
 * A checkout with no dist/ (as after a fresh clone and npm ci): the sources are linked from this
 * repository, the launcher and its build module are copied, so the build lands in the copy.
 */
function freshCheckout(): string {
  const dir = mkdtempSync(join(tmpdir(), 'rholog-cli-'));
  for (const e of ['shared', 'node_modules', 'package.json', 'package-lock.json', 'tsconfig.json'])
    symlinkSync(join(root, e), join(dir, e));
  mkdirSync(join(dir, 'scripts/build'), { recursive: true });
  for (const e of readdirSync(join(root, 'scripts')))
    if (e !== 'build') symlinkSync(join(root, 'scripts', e), join(dir, 'scripts', e));
  for (const f of ['cli.mjs', 'cli-build.mjs', 'newest.mjs']) copyFileSync(join(root, 'scripts/build', f), join(dir, 'scripts/build', f));
  return dir;
}

describe('npm run analyze on a checkout that was never built', () => {
  let dir = '';
  // The copy holds links to this repository; removing it removes the links, not what they point to.
  afterAll(() => dir && rmSync(dir, { recursive: true, force: true }));

  it('builds the command-line tools first, keeps stdout to the JSON answer, and does not build again', () => {
    dir = freshCheckout();
    const run = (args: string[]) =>
      spawnSync(process.execPath, [join(dir, 'scripts/build/cli.mjs'), ...args], {
        cwd: dir,
        encoding: 'utf8',
        timeout: 120_000,
      });
    expect(existsSync(join(dir, 'dist/cli/analyze.js'))).toBe(false);
    // scikit-rf reference: 7 m of solid-PE coax (VF 1/√2.25) into 25 Ω, ρ = −1/3.
    const first = run(['analyze', ref, '--vf', String(1 / 1.5), '--z0', '50', '--json']);
    expect(first.status, first.stderr).toBe(0);
    const json = JSON.parse(first.stdout);
    expect(json.events[0].distance_m).toBeCloseTo(7, 1);
    expect(json.events[0].reflection_coefficient).toBeCloseTo(-1 / 3, 1);
    const built = join(dir, 'dist/cli/analyze.js');
    // Dated well after the sources, so only a rebuild could change it.
    const later = new Date(Math.floor(Date.now() / 1000) * 1000 + 3_600_000);
    utimesSync(built, later, later);
    const second = run(['analyze', ref, '--vf', String(1 / 1.5), '--z0', '50', '--json']);
    expect(second.status).toBe(0);
    expect(JSON.parse(second.stdout).events[0].distance_m).toBe(json.events[0].distance_m);
    expect(Math.round(statSync(built).mtimeMs)).toBe(later.getTime());
    // Bad input keeps the command's own exit status and one line on stderr.
    const bad = run(['analyze', ref, '--vf', 'abc']);
    expect(bad.status).toBe(2);
    expect(bad.stdout).toBe('');
    expect(bad.stderr.trim().split('\n')).toEqual(["analyze: --vf expects a number, got 'abc'"]);
    expect(run(['frobnicate']).status).toBe(2);
    expect(readFileSync(join(dir, 'dist/cli/package.json'), 'utf8')).toContain('commonjs');
  }, 180_000);
});
