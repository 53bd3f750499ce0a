import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, truncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = join(__dirname, '../../..');
const cli = join(root, 'scripts/analyze.ts');
const tsx = join(root, 'node_modules/.bin/tsx');
const ref = (f: string) => join(root, 'tests/fixtures/traces/reference', f);
// scikit-rf reference: 10 m of solid-PE coax, open at the far end.
const good = ref('pe-coax-10m-open.csv');

function run(args: string[]) {
  // The time limit only stops a run that would never end, so that it fails here instead of holding the suite.
  return spawnSync(tsx, [cli, ...args], { cwd: root, encoding: 'utf8', timeout: 60_000 });
}

/** Runs `body` with a fresh temporary folder, removed afterwards. */
function withDir(body: (dir: string) => void) {
  const dir = mkdtempSync(join(tmpdir(), 'rholog-analyze-'));
  try {
    body(dir);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** Refused: a non-zero exit, nothing on stdout and exactly one line on stderr that contains every `says`. */
function expectRefused(args: string[], ...says: string[]) {
  const r = run(args);
  const what = args.join(' ');
  expect(r.status, what).not.toBe(0);
  expect(r.status, what).not.toBeNull();
  expect(r.stdout, what).toBe('');
  expect(r.stderr.trim().split('\n'), what).toHaveLength(1);
  expect(r.stderr, what).not.toMatch(/\n\s+at /);
  for (const s of says) expect(r.stderr, what).toContain(s);
}

describe('analyze command: option values', () => {
  it('refuses a velocity factor slower than any practical cable, and says the floor', () => {
    // VF is in (0, 1]; below 0.2 is no field cable (common practice), almost always a slipped unit.
    for (const vf of ['1e-300', '0.01', '0.05', '0.19']) expectRefused([good, '--vf', vf, '--json'], '--vf', '0.2', `'${vf}'`);
    for (const vf of ['1e-300', '0.1'])
      expectRefused([good, '--vf', '0.66', '--instrument-vf', vf, '--json'], '--instrument-vf', '0.2');
    // The same rule for a velocity factor the file names in its metadata.
    withDir((dir) => {
      const file = join(dir, 'slow.csv');
      writeFileSync(file, `# vf=0.1\n${readFileSync(good, 'utf8')}`);
      expectRefused([file, '--json'], 'velocity factor the file names', '0.2', 'give --vf');
    });
    // The floor itself and a real cable's VF are taken.
    for (const vf of ['0.2', '0.66']) {
      const r = run([good, '--vf', vf, '--json']);
      expect(r.status, vf).toBe(0);
      expect(JSON.parse(r.stdout).vf).toBe(Number(vf));
    }
  });

  it('refuses a channel that no file can have, naming the option and the value as typed', () => {
    // Channels are numbered from 1; a file has at most 64 columns (the reader's MAX_COLUMNS).
    for (const channel of ['', '  ', '0', '65', '99999999999999999999']) {
      expectRefused([good, '--vf', '0.66', '--channel', channel, '--json'], '--channel', `'${channel.trim()}`, '1 to 64');
    }
    // A number in range is still looked for in the file, which says what it has.
    expectRefused([good, '--vf', '0.66', '--channel', '2', '--json'], "channel '2' is not in the file; its channels are 1 'rho'");
  });

  it('reads option values as plain decimal numbers only', () => {
    // Number() would read 0x1 as 1 and 0o62 as 50; a number typed for a cable is written in decimal.
    for (const [option, value] of [
      ['--vf', '0x1'],
      ['--vf', '0b1'],
      ['--z0', '0o62'],
      ['--z0', '0x32'],
      ['--zero-ns', '1_0'],
    ]) {
      const vf = option === '--vf' ? [] : ['--vf', '0.66'];
      expectRefused([good, ...vf, option, value, '--json'], `${option} expects a number, got '${value}'`);
    }
    // Signs, exponents and a leading point are decimals too.
    const r = run([good, '--vf', '.66', '--z0', '5e1', '--zero-ns', '+0', '--json']);
    expect(r.status).toBe(0);
    const json = JSON.parse(r.stdout);
    expect([json.vf, json.z0_ohm, json.zero_offset_ns]).toEqual([0.66, 50, 0]);
  });

  it('refuses a zero offset, lead length, sample interval or impedance no measurement has, naming the option', () => {
    // The web upload form's limits (shared/schemas/traces.ts): a zero offset under 1 ms either way,
    // a test lead from 0 to under 1000 m, a sample interval from 1 ps to under 1 s; a cable's Z0 at most 10 kΩ
    // (shared/schemas/cables.ts).
    const cases: Array<[string, string, string]> = [
      ['--zero-ns', 'NaN', 'expects a number'],
      ['--zero-ns', '-Infinity', 'expects a number'],
      ['--zero-ns', '1e300', '1 ms'],
      ['--zero-ns', '-1e300', '1 ms'],
      ['--zero-ns', '1000000', '1 ms'],
      ['--lead-m', 'Infinity', 'expects a number'],
      ['--lead-m', '-1', '1000 m'],
      ['--lead-m', '1e12', '1000 m'],
      ['--lead-m', '1000', '1000 m'],
      ['--sample-interval-ns', '1e-300', '1 ps'],
      ['--sample-interval-ns', '1e9', '1 s'],
      ['--z0', '1e300', '10000'],
      ['--z0', '-50', '10000'],
      ['--vf-tolerance', '0.5', '0.5'],
    ];
    for (const [option, value, rule] of cases)
      expectRefused([good, '--vf', '0.66', option, value, '--json'], option, rule, `'${value}'`);
    // The same rule for an impedance the file names in its metadata, when --z0 does not set one.
    withDir((dir) => {
      const file = join(dir, 'z0.csv');
      writeFileSync(file, `# z0=1e300\n${readFileSync(good, 'utf8')}`);
      expectRefused([file, '--vf', '0.66', '--json'], 'impedance the file names', '10000', 'give --z0');
      const r = run([file, '--vf', '0.66', '--z0', '50', '--json']);
      expect(r.status).toBe(0);
      expect(JSON.parse(r.stdout).z0_ohm).toBe(50);
    });
    // In range, each is used as given.
    const plain = JSON.parse(run([good, '--vf', String(1 / 1.5), '--json']).stdout);
    const moved = JSON.parse(run([good, '--vf', String(1 / 1.5), '--zero-ns', '-5', '--lead-m', '2', '--json']).stdout);
    expect(moved.zero_offset_ns).toBe(-5);
    expect(moved.lead_length_m).toBe(2);
    expect(plain.events[0].distance_m).toBeCloseTo(10, 0);
    // Time zero 5 ns earlier adds 5 ns of round trip, 5 ns · c · (1/1.5) / 2 = 0.50 m; the 2 m lead comes off.
    expect(moved.events[0].distance_m - plain.events[0].distance_m).toBeCloseTo(0.5 - 2, 1);
  });
});

describe('analyze command: one line for one mistake', () => {
  it('says a bad option once, not once for every file, and before reading any file', () => {
    const second = ref('pe-coax-25m-short.csv');
    for (const [args, says] of [
      [['--vf', 'abc'], "--vf expects a number, got 'abc'"],
      [['--vf', '0.66', '--lead-m', '-1'], '--lead-m'],
      [['--vf', '0.66', '--loss-db-per-100m', '5.2'], '--loss-db-per-100m'],
    ] as const) {
      const r = run([good, second, ...args]);
      expect(r.status, says).toBe(2);
      expect(r.stdout, says).toBe('');
      expect(r.stderr.trim().split('\n'), says).toHaveLength(1);
      expect(r.stderr, says).toContain(says);
      // The option is at fault, not a file: no file is named.
      expect(r.stderr, says).not.toContain('.csv');
    }
    // An option that takes one value, given twice, is a slip: which one was meant is not known.
    for (const args of [
      ['--vf', '0.5', '--vf', '0.7'],
      ['--vf=0.66', '--vf', '0.66'],
      ['--vf', '0.66', '--zero-ns', '-3', '--zero-ns=4'],
      ['--vf', '0.66', '--mode', 'step', '--mode', 'pulse'],
    ]) {
      const twice = run([good, ...args, '--json']);
      expect(twice.status, args.join(' ')).toBe(2);
      expect(twice.stdout, args.join(' ')).toBe('');
      expect(twice.stderr.trim().split('\n'), args.join(' ')).toHaveLength(1);
      expect(twice.stderr, args.join(' ')).toMatch(/--(vf|zero-ns|mode) is given twice/);
    }
    // A switch given twice still means the same.
    expect(run([good, '--vf', '0.66', '--json', '--json']).status).toBe(0);
    // A bad option is found even when the file is missing.
    const missing = run([join(root, 'no-such-trace.csv'), '--vf', '7']);
    expect(missing.stderr.trim().split('\n')).toHaveLength(1);
    expect(missing.stderr).toContain('--vf must be a velocity factor');
  });
});

describe('analyze command: the file', () => {
  it('refuses a never-ending input, a file over the size limit and a folder, each with one line', () => {
    // /dev/zero never ends: read up to the reader's 64 MiB limit, no further.
    expectRefused(['/dev/zero', '--vf', '0.66', '--json'], '/dev/zero', 'larger than the 64 MiB limit');
    withDir((dir) => {
      // A sparse 3 GiB file: refused from its size, before any of it is read.
      const huge = join(dir, 'huge.csv');
      writeFileSync(huge, '');
      truncateSync(huge, 3 * 1024 ** 3);
      expectRefused([huge, '--vf', '0.66', '--json'], 'huge.csv', 'larger than the 64 MiB limit');
      const folder = join(dir, 'traces.csv');
      mkdirSync(folder);
      expectRefused([folder, '--vf', '0.66', '--json'], 'traces.csv', 'is a folder, not a trace file');
    });
  }, 180_000);

  it('keeps a file name with a line break or a terminal escape in it on its one line', () => {
    withDir((dir) => {
      const name = join(dir, 'a\nb\u001b[31m.csv');
      expectRefused([name, '--vf', '0.66'], 'a\\nb\\u001b[31m.csv: no such file');
      // The same name, when the file exists and is empty.
      writeFileSync(name, '');
      expectRefused([name, '--vf', '0.66'], 'a\\nb\\u001b[31m.csv: the file is empty');
    });
  });
});

describe('analyze command: over-range codes', () => {
  it("refuses an instrument's over-range code in the column it reads, naming the line", () => {
    // SCPI instruments write +9.9E37 for a reading over range, -9.9E37 under it and 9.91E37 for
    // no reading (SCPI 1999, common practice); none is a measured value, however it is written.
    const lines = readFileSync(good, 'utf8').split('\n');
    const [t, rho] = lines[200].split(',');
    withDir((dir) => {
      for (const code of ['9.9E37', '-9.9e+37', '9.91E37', '99.0E36']) {
        const file = join(dir, 'over.csv');
        lines[200] = `${t},${code}`;
        writeFileSync(file, lines.join('\n'));
        expectRefused([file, '--vf', '0.66', '--json'], 'line 201', `'${code}'`, 'over-range');
        // The same with every field quoted, which the general CSV reader reads.
        const quoted = join(dir, 'over-quoted.csv');
        writeFileSync(
          quoted,
          lines
            .map((l, i) =>
              i < 3 || l === ''
                ? l
                : l
                    .split(',')
                    .map((f) => `"${f.trim()}"`)
                    .join(','),
            )
            .join('\n'),
        );
        expectRefused([quoted, '--vf', '0.66', '--json'], 'line 201', `'${code}'`, 'over-range');
      }
      // A code in a column that is not read does not stop the file: CH1 is clipped, rho is analysed.
      const scope = join(dir, 'scope.csv');
      lines[200] = `${t},${rho}`;
      const rows = lines
        .slice(3)
        .filter((l) => l !== '')
        .map((l, i) => {
          const [a, b] = l.split(',');
          return `${a},${i === 198 ? '9.9E37' : '0.1'},${b}`;
        });
      writeFileSync(scope, ['time (ps),CH1,rho', ...rows].join('\n'));
      const r = run([scope, '--vf', String(1 / 1.5), '--channel', 'rho', '--json']);
      expect(r.stderr).toBe('');
      expect(r.status).toBe(0);
      expect(JSON.parse(r.stdout).events[0].distance_m).toBeCloseTo(10, 0);
    });
  });
});

describe('analyze command: output', () => {
  it('stops quietly when the program reading its output stops first', () => {
    // 200 results (about 350 kB of JSON) overfill a pipe's 64 KiB buffer, so writing to a reader that has
    // gone ends in EPIPE whichever comes first; 'true' reads nothing and exits.
    const files = Array.from({ length: 200 }, () => `'${good}'`).join(' ');
    const r = spawnSync('bash', ['-c', `'${tsx}' '${cli}' ${files} --vf 0.66 --json | true; exit \${PIPESTATUS[0]}`], {
      cwd: root,
      encoding: 'utf8',
      timeout: 120_000,
    });
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
  }, 180_000);
});
