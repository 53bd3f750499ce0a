import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { COAX_50 } from '../../../scripts/sim/cables';
import { defaultAcquisition, simulateScenario, type Scenario } from '../../../scripts/sim/scenario';

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
    // A negative value is read as the option's value and refused by its own rule; an unknown option and
    // a missing file also take one line each.
    for (const [args, says] of [
      [[ref('pe-coax-10m-open.csv'), '--vf', '-1'], 'vf must be a velocity factor'],
      [[ref('pe-coax-10m-open.csv'), '--vf', '0.66', '--z0', '-50'], '--z0 must be an impedance above 0'],
      [[ref('pe-coax-10m-open.csv'), '--bogus'], "Unknown option '--bogus'"],
      [[], 'no trace file given'],
    ] as const) {
      const r2 = run([...args]);
      expect(r2.status, args.join(' ')).not.toBe(0);
      expect(r2.stderr.trim().split('\n'), args.join(' ')).toHaveLength(1);
      expect(r2.stderr).toContain(says);
    }
  });

  it('takes the cable loss as dB per 100 m at a frequency, and refuses a value it cannot read', () => {
    const ok = run([
      ref('pe-coax-10m-open.csv'),
      '--vf',
      String(1 / 1.5),
      '--loss-db-per-100m',
      '5.2@10MHz',
      '--loss-db-per-100m',
      '16@100MHz',
      '--json',
    ]);
    expect(ok.status).toBe(0);
    expect(JSON.parse(ok.stdout).events[0].type).toBe('open');
    // A slipped unit (10 Hz for 10 MHz), a figure past the library's 1000 dB/100 m and past 100 GHz are refused too.
    for (const bad of ['5.2', '5.2@10', 'fast@10MHz', '5.2@0MHz', '5.2@10Hz', '2000@10MHz', '5@1e12Hz', '1e999@10MHz']) {
      const r = run([ref('pe-coax-10m-open.csv'), '--vf', '0.66', '--loss-db-per-100m', bad]);
      expect(r.status).not.toBe(0);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toContain('--loss-db-per-100m');
    }
    const twice = run([ref('pe-coax-10m-open.csv'), '--vf', '0.66', '--loss-db-per-100m', '5@10MHz', '--loss-db-per-100m', '5@10MHz']);
    expect(twice.status).not.toBe(0);
    expect(twice.stderr.trim().split('\n')).toHaveLength(1);
    expect(twice.stderr).toContain('twice');
    // A figure with a non-zero digit too small for a number to hold would read as a lossless cable; 0 itself is allowed.
    const tiny = run([ref('pe-coax-10m-open.csv'), '--vf', '0.66', '--loss-db-per-100m', '1e-400@10MHz']);
    expect(tiny.status).toBe(2);
    expect(tiny.stderr.trim()).toBe("analyze: --loss-db-per-100m figure is too small to read, got '1e-400@10MHz'; write 0 for no loss");
    expect(run([ref('pe-coax-10m-open.csv'), '--vf', '0.66', '--loss-db-per-100m', '0.0e-5@10MHz']).status).toBe(0);
  });

  it('reads the channel asked for from an oscilloscope export and says which one it read', () => {
    // Simulated route: 50 Ω coax, 100 Ω shunt at 23.5 m (ρ = −0.2), open end at 60 m, on CH2;
    // CH1 carries an unrelated sine. VF 0.66 is the simulated cable's.
    const route: Scenario = {
      name: 'scope',
      cable: COAX_50,
      lengthM: 60,
      end: 'open',
      features: [{ kind: 'shunt', atM: 23.5, rOhm: 100 }],
    };
    const sim = simulateScenario(route, defaultAcquisition(route, 'step', 31, 0.002, 12));
    const rows = ['Time (s),CH1 (V),CH2 (V)'];
    sim.timeS.forEach((t, i) => rows.push(`${t},${(0.3 * Math.sin(i / 40)).toFixed(5)},${sim.volts[i].toFixed(5)}`));
    const dir = mkdtempSync(join(tmpdir(), 'rholog-cli-'));
    try {
      const file = join(dir, 'scope.csv');
      writeFileSync(file, rows.join('\n') + '\n');
      for (const channel of ['2', 'CH2']) {
        const r = run([file, '--vf', '0.66', '--channel', channel, '--json']);
        expect(r.status).toBe(0);
        const json = JSON.parse(r.stdout);
        expect(json.channel.name).toMatch(/^CH2/);
        const primary = json.events.filter((e: { likely_multiple_of: number | null }) => e.likely_multiple_of === null);
        expect(primary.map((e: { type: string }) => e.type)).toEqual(['impedance-drop', 'open']);
        expect(Math.abs(primary[0].distance_m - 23.5)).toBeLessThanOrEqual(0.5);
        expect(Math.abs(primary[1].distance_m - 60)).toBeLessThanOrEqual(0.6);
        expect(primary[0].reflection_coefficient_raw).toBeCloseTo(-0.2, 1);
      }
      const first = JSON.parse(run([file, '--vf', '0.66', '--json']).stdout);
      expect(first.channel.name).toMatch(/^CH1/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('states the false-event rate its threshold is set for', () => {
    const json = JSON.parse(run([ref('pe-coax-7m-25ohm.csv'), '--vf', String(1 / 1.5), '--json']).stdout);
    expect(json.detection.false_events_per_trace).toBe(0.01);
    // One false event in 100 traces over N independent outputs: k = Φ⁻¹(1 − 0.01/2N) (Gaussian
    // tail, common practice); for N between 100 and 10⁶ that is between 3.9 and 6.1.
    expect(json.detection.threshold_sigma).toBeGreaterThan(3.8);
    expect(json.detection.threshold_sigma).toBeLessThan(6.2);
  });
});
