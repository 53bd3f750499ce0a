/**
 * Benchmark: parse + analyse a 1 000 000-sample two-column CSV (about 20 MB)
 * and a 10 000-sample one. Each measurement runs in a fresh child process so
 * its peak resident memory is its own.
 *
 * Then, on the 1,000,000-sample file and side by side, each as a median with
 * its ratio to the numpy/scipy script's whole run: the engine's stages (read
 * the bytes, parse, analyse), the limit loop (read the file and parse its
 * numbers in a tight loop, nothing else), the script and the whole built
 * command (`node dist/cli/rholog.js analyze FILE`), the last two timed as
 * whole processes in alternating rounds; and the command's start-up on a
 * 200-sample file beside node's own start-up. Needs `npm run build` for the command.
 *
 *   npm run bench
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { analyzeCsv, analyzeTrace, parseTraceCsv } from '../shared/trace';
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

const median = (v: number[]) => [...v].sort((a, b) => a - b)[v.length >> 1];

/** The floor: read the file and parse its two numeric columns in one tight loop over the bytes. */
function limitLoop(file: string): number {
  const b = readFileSync(file);
  const t = new Float64Array(b.length >> 3);
  const v = new Float64Array(b.length >> 3);
  let i = b.indexOf(10) + 1;
  let n = 0;
  let col = 0;
  let num = 0;
  let scale = 0;
  let neg = false;
  for (; i < b.length; i++) {
    const c = b[i];
    if (c >= 48 && c <= 57) {
      num = num * 10 + (c - 48);
      if (scale) scale *= 10;
    } else if (c === 46) scale = 1;
    else if (c === 45) neg = true;
    else if (c === 44 || c === 10) {
      const x = (neg ? -num : num) / (scale || 1);
      if (col === 0) t[n] = x;
      else v[n++] = x;
      col = c === 44 ? 1 : 0;
      num = 0;
      scale = 0;
      neg = false;
    }
  }
  return n + v[n >> 1] * 0 + t[0] * 0;
}

/** Child process: median of each engine stage and of the limit loop on one file. */
function measureStages(file: string, repeats: number) {
  const read: number[] = [];
  const parse: number[] = [];
  const analyse: number[] = [];
  const limit: number[] = [];
  for (let r = 0; r < repeats + 1; r++) {
    const t0 = performance.now();
    const bytes = readFileSync(file);
    const t1 = performance.now();
    const parsed = parseTraceCsv(bytes);
    const t2 = performance.now();
    analyzeTrace(parsed, { vf: 0.66, z0Ohm: 50 });
    const t3 = performance.now();
    const n = limitLoop(file);
    const t4 = performance.now();
    // Both must read every sample, or the comparison means nothing.
    if (n !== parsed.amplitude.length) throw new Error(`limit loop read ${n} samples, the reader ${parsed.amplitude.length}`);
    if (r === 0) continue; // the first round warms the compiler
    read.push(t1 - t0);
    parse.push(t2 - t1);
    analyse.push(t3 - t2);
    limit.push(t4 - t3);
  }
  process.stdout.write(JSON.stringify({ read: median(read), parse: median(parse), analyse: median(analyse), limit: median(limit) }));
}

/** Wall time of whole processes, alternating between the commands each round. */
function wallTimes(commands: Array<[string, string[]]>, rounds: number): number[] {
  const times = commands.map(() => [] as number[]);
  for (let r = 0; r < rounds; r++) {
    commands.forEach(([cmd, args], k) => {
      const t0 = performance.now();
      const p = spawnSync(cmd, args, { stdio: ['ignore', 'ignore', 'pipe'] });
      if (p.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed: ${p.stderr}`);
      times[k].push(performance.now() - t0);
    });
  }
  return times.map(median);
}

/**
 * Peak resident memory of one whole run of the built command, as the operating system counts it: a
 * preloaded hook writes the process's own maxRSS to stderr as it exits (a separate run from the timed ones).
 */
function cliPeakRssMb(dir: string, bin: string, file: string): number {
  const hook = join(dir, 'peak-rss.cjs');
  writeFileSync(hook, "process.on('exit', () => process.stderr.write(`\\npeak-rss-kb ${process.resourceUsage().maxRSS}\\n`));\n");
  const p = spawnSync(process.execPath, ['--require', hook, bin, 'analyze', file, '--vf', '0.66', '--z0', '50'], {
    stdio: ['ignore', 'ignore', 'pipe'],
    encoding: 'utf8',
  });
  const m = /peak-rss-kb (\d+)/.exec(p.stderr);
  if (p.status !== 0 || !m) throw new Error(`measuring the command's peak memory failed: ${p.stderr}`);
  return Number(m[1]) / 1024;
}

function sideBySide(dir: string, file: string): string[] {
  const bin = join(import.meta.dirname, '../dist/cli/rholog.js');
  const lines = ['', `side by side on the 1,000,000-sample file (load average ${loadavg().map((l) => l.toFixed(2)).join(' ')}):`];
  const stages = JSON.parse(
    execFileSync(process.execPath, [...process.execArgv, process.argv[1], '--stages', file, '5'], { encoding: 'utf8' }),
  ) as { read: number; parse: number; analyse: number; limit: number };
  const havePython = spawnSync('/usr/bin/python3', ['-c', 'import numpy, scipy'], { stdio: 'ignore' }).status === 0;
  if (!existsSync(bin)) lines.push(`  (the built command ${bin} is missing: run npm run build)`);
  const commands: Array<[string, string[]]> = [];
  if (havePython) commands.push(['/usr/bin/python3', [join(import.meta.dirname, 'bench-numpy.py'), file]]);
  if (existsSync(bin)) commands.push([process.execPath, [bin, 'analyze', file, '--vf', '0.66', '--z0', '50']]);
  const walls = wallTimes(commands, 5);
  const script = havePython ? walls[0] : NaN;
  const cli = existsSync(bin) ? walls[walls.length - 1] : NaN;
  const row = (label: string, ms: number) =>
    `  ${label.padEnd(52)} ${ms.toFixed(1).padStart(8)} ms  ${Number.isFinite(script) ? `${(ms / script).toFixed(2)} × the script` : ''}`;
  lines.push(row('engine: read the bytes', stages.read));
  lines.push(row('engine: parse', stages.parse));
  lines.push(row('engine: analyse', stages.analyse));
  lines.push(row('engine: read + parse + analyse', stages.read + stages.parse + stages.analyse));
  lines.push(row('limit loop: read + parse numbers, nothing else', stages.limit));
  lines.push(`  parse + analyse ÷ limit loop: ${((stages.read + stages.parse + stages.analyse) / stages.limit).toFixed(2)}`);
  if (havePython) lines.push(row('numpy/scipy script, whole process', script));
  else lines.push('  (numpy/scipy script skipped: /usr/bin/python3 with numpy and scipy not found)');
  if (Number.isFinite(cli)) {
    lines.push(row('rholog analyze (built, node), whole process', cli));
    lines.push(`  rholog analyze peak RSS, whole process: ${cliPeakRssMb(dir, bin, file).toFixed(0)} MB (the product's own memory figure)`);
    const tiny = join(dir, 'tiny.csv');
    writeFileSync(tiny, demoCsv(200));
    // Alternating with node's own start, the floor no command can go under on this machine.
    const [startUp, nodeAlone] = wallTimes(
      [
        [process.execPath, [bin, 'analyze', tiny, '--vf', '0.66']],
        [process.execPath, ['-e', '0']],
      ],
      11,
    );
    lines.push(row('rholog analyze start-up, 200-sample file', startUp));
    lines.push(row('node alone (node -e 0), start-up', nodeAlone));
  }
  return lines;
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
  if (process.argv[2] === '--stages') {
    measureStages(process.argv[3], Number(process.argv[4]));
    return;
  }
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
    rows.push(...sideBySide(dir, join(dir, 'trace-1000000.csv')));
    console.log(rows.join('\n'));
    if (!ok) process.exitCode = 1;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

main();
