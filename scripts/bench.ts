/**
 * Benchmark: parse + analyse a 1 000 000-sample two-column CSV (about 20 MB)
 * and a 10 000-sample one. Each measurement runs in a fresh child process so
 * its peak resident memory is its own.
 *
 *   npm run bench
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { analyzeCsv } from '../shared/trace';
import { gaussianSource } from './sim/line-model';

const GOALS = { largeMs: 1000, smallMs: 20, largeRssMb: 200 };

/** A demo step trace: launch, a 100 Ω shunt fault and an open end, with loss creep, noise and 12-bit steps. */
function demoCsv(samples: number): string {
  const dtNs = 0.05;
  const rnd = gaussianSource(42);
  const erf = (x: number) => {
    // Abramowitz & Stegun 7.1.26
    const s = Math.sign(x);
    const a = Math.abs(x);
    const t = 1 / (1 + 0.3275911 * a);
    return (
      s * (1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-a * a))
    );
  };
  const edge = (t: number, at: number, w: number) => 0.5 * (1 + erf((t - at) / w));
  const lsb = 5 / 4096;
  const tLaunch = samples * dtNs * 0.02;
  const tFault = samples * dtNs * 0.4;
  const tEnd = samples * dtNs * 0.8;
  const parts: string[] = ['time_ns,voltage_mV'];
  for (let i = 0; i < samples; i++) {
    const t = i * dtNs;
    const creep = 0.02 * Math.sqrt(Math.max(0, t - tLaunch) / (samples * dtNs));
    let v = edge(t, tLaunch, 0.3) * (1 + creep) - 0.2 * edge(t, tFault, 2) + 0.75 * edge(t, tEnd, 6);
    v += 0.002 * rnd();
    v = Math.round(v / lsb) * lsb;
    parts.push(`${t.toFixed(3)},${(v * 1000).toFixed(3)}`);
  }
  return parts.join('\n') + '\n';
}

function measure(file: string, repeats: number) {
  const gc = (globalThis as { gc?: () => void }).gc;
  gc?.();
  // What the runtime and the TypeScript loader hold before any trace is read.
  const baseRssMb = process.memoryUsage().rss / 1048576;
  // The file's bytes: the reader takes its numbers straight from them, with no text decoding.
  const text = readFileSync(file);
  const times: number[] = [];
  let events = 0;
  // The first run gives the peak memory of reading and analysing one file; it and one more
  // warm the compiler, so the timed runs are for compiled code, as in a running server.
  analyzeCsv(text, {}, { vf: 0.66, z0Ohm: 50 });
  const rssMb = process.resourceUsage().maxRSS / 1024;
  gc?.();
  for (let r = 0; r < (text.length > 5e6 ? 1 : 20); r++) analyzeCsv(text, {}, { vf: 0.66, z0Ohm: 50 });
  for (let r = 0; r < repeats; r++) {
    // A full collection before each large run keeps one run's garbage out of the next.
    if (text.length > 5e6) gc?.();
    const t0 = performance.now();
    const a = analyzeCsv(text, {}, { vf: 0.66, z0Ohm: 50 });
    times.push(performance.now() - t0);
    events = a.events.length;
  }
  times.sort((a, b) => a - b);
  process.stdout.write(JSON.stringify({ medianMs: times[times.length >> 1], bestMs: times[0], events, rssMb, baseRssMb }));
}

/** The same large file through numpy.loadtxt + scipy (scripts/bench-numpy.py), when Debian's python3 has them. */
function numpyBaseline(file: string): string {
  try {
    const out = execFileSync('/usr/bin/python3', [join(import.meta.dirname, 'bench-numpy.py'), file], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'ignore'] });
    const r = JSON.parse(out) as { seconds: number };
    return `  numpy.loadtxt + scipy filter/peaks on the same 1,000,000-sample file: ${(r.seconds * 1000).toFixed(0)} ms`;
  } catch {
    return '  (numpy/scipy baseline skipped: /usr/bin/python3 with numpy and scipy not found)';
  }
}

function main() {
  if (process.argv[2] === '--measure') {
    measure(process.argv[3], Number(process.argv[4]));
    return;
  }
  const dir = mkdtempSync(join(tmpdir(), 'rholog-bench-'));
  try {
    const rows: string[] = [];
    let ok = true;
    for (const [samples, repeats, goalMs] of [
      [1_000_000, 5, GOALS.largeMs],
      [10_000, 200, GOALS.smallMs],
    ] as const) {
      const file = join(dir, `trace-${samples}.csv`);
      writeFileSync(file, demoCsv(samples));
      const mb = statSync(file).size / 1e6;
      const out = execFileSync(
        process.execPath,
        ['--expose-gc', ...process.execArgv, process.argv[1], '--measure', file, String(repeats)],
        {
          encoding: 'utf8',
        },
      );
      const r = JSON.parse(out) as { medianMs: number; bestMs: number; events: number; rssMb: number; baseRssMb: number };
      const rate = samples / (r.medianMs / 1000);
      // Memory goal: what reading and analysing the trace adds to the process.
      const traceMb = r.rssMb - r.baseRssMb;
      const within = r.medianMs < goalMs && (samples < 1_000_000 || traceMb < GOALS.largeRssMb);
      ok &&= within;
      rows.push(
        `${String(samples).padStart(9)} samples (${mb.toFixed(1)} MB): median ${r.medianMs.toFixed(1)} ms, best ${r.bestMs.toFixed(1)} ms over ${repeats} runs, ` +
          `${(rate / 1e6).toFixed(2)} M samples/s, peak RSS ${r.rssMb.toFixed(0)} MB (${traceMb.toFixed(0)} MB above the ${r.baseRssMb.toFixed(0)} MB runtime and loader), ${r.events} events — ` +
          `goal < ${goalMs} ms${samples >= 1_000_000 ? `, < ${GOALS.largeRssMb} MB` : ''}: ${within ? 'met' : 'MISSED'}`,
      );
    }
    rows.push(numpyBaseline(join(dir, 'trace-1000000.csv')));
    console.log(rows.join('\n'));
    if (!ok) process.exitCode = 1;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

main();
