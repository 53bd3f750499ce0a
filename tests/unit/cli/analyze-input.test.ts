import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
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
  return spawnSync(tsx, [cli, ...args], { cwd: root, encoding: 'utf8' });
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
    for (const vf of ['1e-300', '0.1']) expectRefused([good, '--vf', '0.66', '--instrument-vf', vf, '--json'], '--instrument-vf', '0.2');
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
});
