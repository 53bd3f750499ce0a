import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';

const root = join(__dirname, '../../..');
const bin = join(root, JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')).bin.rholog as string);
const ref = (f: string) => join(root, 'tests/fixtures/traces/reference', f);

function run(args: string[]) {
  return spawnSync(process.execPath, [bin, ...args], { cwd: root, encoding: 'utf8' });
}

describe('the built rholog command', () => {
  beforeAll(() => {
    // The command runs from the esbuild output, with node alone.
    execFileSync(process.execPath, [join(root, 'scripts/build/build-node.mjs')], { cwd: root, stdio: 'pipe' });
  }, 120_000);

  it('analyses a file with the analyze subcommand, as plain JavaScript', () => {
    // scikit-rf reference: 7 m of solid-PE coax (VF 1/√2.25) into 25 Ω, ρ = −1/3.
    const r = run(['analyze', ref('pe-coax-7m-25ohm.csv'), '--vf', String(1 / 1.5), '--z0', '50', '--json']);
    expect(r.status).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.events).toHaveLength(1);
    expect(json.events[0].distance_m).toBeCloseTo(7, 1);
    expect(json.events[0].reflection_coefficient).toBeCloseTo(-1 / 3, 1);
    expect(json.events[0].impedance_ohm).toBeCloseTo(25, 0);
  });

  it('gives the same answer as the TypeScript source', () => {
    const args = [ref('pe-coax-10m-open.csv'), '--vf', String(1 / 1.5), '--json'];
    const built = run(['analyze', ...args]);
    const source = spawnSync(join(root, 'node_modules/.bin/tsx'), [join(root, 'scripts/analyze.ts'), ...args], {
      cwd: root,
      encoding: 'utf8',
    });
    expect(built.status).toBe(0);
    expect(JSON.parse(built.stdout)).toEqual(JSON.parse(source.stdout));
  });

  it('reads a file that needs the general CSV reader as the source does, to the same line of a bad value', () => {
    // Quoted cells are declined by the one-pass reader, so csv-parse reads these (node's own build in the bundle).
    const dir = mkdtempSync(join(tmpdir(), 'rholog-bin-'));
    const rows = ['"time_ns","voltage_V"'];
    for (let i = 0; i < 3000; i++) rows.push(`"${(i * 0.5).toFixed(1)}","${i < 1000 ? '0.500000' : i < 2000 ? '0.750000' : '0.740000'}"`);
    const good = join(dir, 'quoted.csv');
    writeFileSync(good, rows.join('\n'));
    rows[2500] = '"1249.5","0.74x"';
    const bad = join(dir, 'quoted-bad.csv');
    writeFileSync(bad, rows.join('\n'));
    const tsx = join(root, 'node_modules/.bin/tsx');
    const source = (f: string) => spawnSync(tsx, [join(root, 'scripts/analyze.ts'), f, '--vf', '0.66', '--json'], { cwd: root, encoding: 'utf8' });
    const built = run(['analyze', good, '--vf', '0.66', '--json']);
    expect(built.status).toBe(0);
    expect(JSON.parse(built.stdout)).toEqual(JSON.parse(source(good).stdout));
    const builtBad = run(['analyze', bad, '--vf', '0.66', '--json']);
    expect(builtBad.status).toBe(1);
    expect(builtBad.stderr).toContain("line 2501: '0.74x' in column 'voltage_V' is not a number");
    expect(builtBad.stderr.trim()).toBe(source(bad).stderr.trim());
  });

  it('runs the locate subcommand with its own options', () => {
    // Two-ended timing: 4000 ns from A and 5000 ns from B on 900 m puts the fault at 900·4000/9000 = 400 m.
    const r = run(['locate', '--length-m', '900', '--two-ended-ns', '4000,5000', '--json']);
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.installed_length_m).toBe(900);
    expect(json.best.distance_from_a_m).toBeCloseTo(400, 6);
  });

  it('refuses an unknown subcommand with one line on stderr and exit 2', () => {
    const r = run(['measure']);
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/unknown command 'measure'/);
  });

  it('exits non-zero with one stderr line naming a missing file', () => {
    const r = run(['analyze', join(root, 'no-such-trace.csv'), '--vf', '0.66']);
    expect(r.status).not.toBe(0);
    expect(r.stderr).toMatch(/no-such-trace\.csv/);
  });
});
