import { execFileSync, spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = join(__dirname, '../../..');
const cli = join(root, 'scripts/analyze.ts');
const tsx = join(root, 'node_modules/.bin/tsx');
const ref = (f: string) => join(root, 'tests/fixtures/traces/reference', f);

function run(args: string[]) {
  return spawnSync(tsx, [cli, ...args], { cwd: root, encoding: 'utf8' });
}

describe('analyze command', () => {
  it('prints one JSON object with snake_case events for one file', () => {
    // scikit-rf reference: 7 m of solid-PE coax (VF 1/√2.25) into 25 Ω, ρ = −1/3.
    const out = execFileSync(tsx, [cli, ref('pe-coax-7m-25ohm.csv'), '--vf', String(1 / 1.5), '--z0', '50', '--json'], {
      cwd: root,
      encoding: 'utf8',
    });
    const json = JSON.parse(out);
    expect(Array.isArray(json)).toBe(false);
    expect(json.events).toHaveLength(1);
    const e = json.events[0];
    expect(Object.keys(e)).toEqual(
      expect.arrayContaining(['distance_m', 'type', 'reflection_coefficient', 'round_trip_ns', 'uncertainty_m']),
    );
    expect(e.distance_m).toBeCloseTo(7, 1);
    expect(e.type).toBe('impedance-drop');
    expect(e.reflection_coefficient).toBeCloseTo(-1 / 3, 1);
    // Round trip of 7 m at VF 2/3: 2·7/(c·2/3) = 70.05 ns.
    expect(e.round_trip_ns).toBeCloseTo(70.05, 0);
    expect(e.impedance_ohm).toBeCloseTo(25, 0);
  });

  it('prints a JSON array for several files, with feet when asked', () => {
    const r = run([
      ref('pe-coax-10m-open.csv'),
      ref('pe-coax-25m-short.csv'),
      '--vf',
      String(1 / 1.5),
      '--json',
      '--units',
      'ft',
    ]);
    expect(r.status).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.map((j: { events: Array<{ type: string }> }) => j.events[0].type)).toEqual(['open', 'short']);
    // 25 m = 82.02 ft (international foot, 0.3048 m).
    expect(json[1].events[0].distance_ft).toBeCloseTo(82.02, 0);
  });

  it('prints a readable table by default', () => {
    const r = run([ref('pe-coax-18m-75ohm.csv'), '--vf', String(1 / 1.5), '--z0', '50']);
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/18\.0\d\s/);
    expect(r.stdout).toContain('impedance-rise');
  });

  it('fails with one line on stderr for bad input', () => {
    const r = run([join(root, 'tests/fixtures/traces/malformed/nan-amplitude.csv'), '--vf', '0.66']);
    expect(r.status).not.toBe(0);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain('line 14');
    const bad = run([ref('pe-coax-10m-open.csv'), '--vf', 'fast']);
    expect(bad.status).not.toBe(0);
    expect(bad.stderr).toContain('--vf expects a number');
  });
});
