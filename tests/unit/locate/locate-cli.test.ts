import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = join(__dirname, '../../..');
const cli = join(root, 'scripts/locate.ts');
const tsx = join(root, 'node_modules/.bin/tsx');

function run(args: string[]) {
  return spawnSync(tsx, [cli, ...args], { cwd: root, encoding: 'utf8' });
}

describe('locate command', () => {
  it('prints the fused location, window and each method as JSON', () => {
    // From B, 500 m on a 900 m run is 400 m from A. 400 ± 8 m with 414 ± 62 m → 400.229 ± 7.934 m,
    // window ± 2 × 7.934 = 384.361 … 416.098 m (hand-worked inverse-variance mean, as in the fusion tests).
    const r = run(['--length-m', '900', '--tdr-a-m', '414', '--tdr-a-u', '62', '--tdr-b-m', '500', '--tdr-b-u', '8', '--json']);
    expect(r.status).toBe(0);
    expect(r.stderr).toBe('');
    const json = JSON.parse(r.stdout);
    expect(json.consistent).toBe(true);
    expect(json.best.distance_from_a_m).toBeCloseTo(400.229, 3);
    expect(json.best.standard_uncertainty_m).toBeCloseTo(7.934, 3);
    expect(json.best.window_start_m).toBeCloseTo(384.361, 2);
    expect(json.best.window_end_m).toBeCloseTo(416.098, 2);
    expect(json.methods.map((m: { id: string; distance_from_a_m: number }) => [m.id, m.distance_from_a_m])).toEqual([
      ['tdr-a', expect.closeTo(414, 9)],
      ['tdr-b', expect.closeTo(400, 9)],
    ]);
    expect(json.test.degrees_of_freedom).toBe(1);
    expect(json.assumptions).toContain('installed length taken as exact (give --length-u-m)');
  });

  it('locates one fault three ways in a readable report', () => {
    // 900 m run, fault 400 m from A (hand-worked): two-ended 900 × 4000/(4000 + 5000) = 400 m;
    // Murray 0.2222 × 1800 m = 399.96 m; capacitance 900 × 20.8/46.8 = 400 m.
    const r = run([
      '--length-m',
      '900',
      '--two-ended-ns',
      '4000,5000',
      '--murray',
      'end=A,ratio=0.2222',
      '--capacitance',
      'end=A,nf=20.8,sound-nf=46.8',
      '--conductor',
      '95mm2:cu',
      '--temperature-c',
      '12',
    ]);
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/^Best location: 400\.0 m from end A/);
    expect(r.stdout).toContain('The 3 readings agree');
    expect(r.stdout).toMatch(/Murray loop from end A\s+400\.0 m from A\s+400\.0/);
    expect(r.stdout).toMatch(/Capacitance from end A\s+400\.0 m from A\s+400\.0/);
  });

  it('reports readings that disagree on stdout and exits 1 with one line on stderr', () => {
    // 400 ± 8 m from A against 900 − 420 = 480 ± 8 m: χ² = 50 > 3.84.
    const r = run(['--length-m', '900', '--tdr-a-m', '400', '--tdr-a-u', '8', '--tdr-b-m', '420', '--tdr-b-u', '8', '--json']);
    expect(r.status).toBe(1);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^locate: the readings disagree \(chi-square 50\.00 above 3\.84\)/);
    const json = JSON.parse(r.stdout);
    expect(json.consistent).toBe(false);
    expect(json.best).toBeNull();
    expect(json.checks[0]).toMatch(/add up to 820\.0 m on a 900\.0 m run/);
  });

  it.each([
    [
      ['--length-m', '900', '--murray', 'end=A,ratio=1.2', '--conductor', '95mm2:cu'],
      /--murray: Murray bridge ratio must be between 0 and 1, got 1\.2/,
    ],
    [['--length-m', '900', '--capacitance', 'end=A,nf=60,sound-nf=52'], /--capacitance: .*above the whole cable's 52\.00 nF/],
    [['--length-m', '900', '--tdr-a-m', '950', '--tdr-a-u', '8'], /--tdr-a-m: .*950\.0 m from end A, outside the 900 m cable/],
    [
      ['--length-m', '900', '--murray', 'end=A,ratio=0.2,colour=red', '--conductor', '95mm2:cu'],
      /--murray: unknown key 'colour'/,
    ],
    [['--tdr-a-m', '400', '--tdr-a-u', '8'], /--length-m is required/],
  ])('refuses bad readings with exit 2 and one stderr line: %j', (args, message) => {
    const r = run(args);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(message);
  });

  it('documents every method option and the safety cautions in --help', () => {
    const r = run(['--help']);
    expect(r.status).toBe(0);
    for (const option of [
      '--length-m',
      '--tdr-a-m',
      '--two-ended-ns',
      '--murray',
      '--varley',
      '--capacitance',
      '--loop-resistance',
      '--conductor',
    ])
      expect(r.stdout).toContain(option);
    expect(r.stdout).toMatch(/lock out and prove it dead/);
    expect(r.stdout).toMatch(/qualified/);
  });
});
