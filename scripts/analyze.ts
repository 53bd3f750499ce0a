/**
 * Command line: analyse TDR trace CSV files and print their reflection events.
 *
 *   npm run --silent analyze -- FILE... [--vf 0.66] [--z0 50] [--mode auto|step|pulse]
 *     [--zero-ns N] [--lead-m N] [--sample-interval-ns N] [--instrument-vf V]
 *     [--vf-tolerance F] [--loss-db-per-100m 5.2@10MHz]... [--channel NAME|N]
 *     [--units m|ft] [--json]
 */
import { closeSync, fstatSync, openSync, readSync } from 'node:fs';
import { parseArgs } from 'node:util';
import {
  analyzeTrace,
  DEFAULT_MAX_BYTES,
  MAX_COLUMNS,
  parseTraceCsv,
  TraceInputError,
  type ParsedTrace,
  type TraceAnalysis,
} from '../shared/trace';
import { CALIBRATION_VF_MAX, CALIBRATION_VF_MIN } from '../shared/cable/calibration';
import { M_PER_FT } from '../shared/cable/propagation';

const USAGE = `usage: analyze FILE... [--vf 0.66] [--z0 50] [--mode auto|step|pulse] [--zero-ns N] [--lead-m N]
       [--sample-interval-ns N] [--instrument-vf V] [--vf-tolerance 0.02]
       [--loss-db-per-100m 5.2@10MHz]... [--channel NAME|N] [--units m|ft] [--json]`;

const FREQUENCY_UNITS: Record<string, number> = { hz: 1, khz: 1e3, mhz: 1e6, ghz: 1e9 };

/** "5.2@10MHz" → { dbPer100m: 5.2, frequencyHz: 1e7 }: an attenuation and the frequency it is stated at. */
function parseLoss(raw: string): { dbPer100m: number; frequencyHz: number } {
  const m = /^\s*([0-9]*\.?[0-9]+(?:e[-+]?\d+)?)\s*@\s*([0-9]*\.?[0-9]+(?:e[-+]?\d+)?)\s*(hz|khz|mhz|ghz)\s*$/i.exec(raw);
  if (!m)
    throw new TraceInputError('BAD_OPTION', `--loss-db-per-100m expects DB@FREQUENCY such as 5.2@10MHz, got '${raw}'`, {
      field: 'loss-db-per-100m',
    });
  const frequencyHz = Number(m[2]) * FREQUENCY_UNITS[m[3].toLowerCase()];
  if (!(frequencyHz > 0))
    throw new TraceInputError('BAD_OPTION', `--loss-db-per-100m needs a frequency above 0, got '${raw}'`, {
      field: 'loss-db-per-100m',
    });
  // Datasheets state attenuation from about 100 kHz up (common practice); under 1 kHz is a slipped unit.
  if (!(frequencyHz >= 1e3 && frequencyHz <= 1e11))
    throw new TraceInputError('BAD_OPTION', `--loss-db-per-100m needs a frequency from 1 kHz to 100 GHz, got '${raw}'`, {
      field: 'loss-db-per-100m',
    });
  const dbPer100m = Number(m[1]);
  // A figure written with a non-zero digit that reads as 0 (1e-400) fell below what a number can hold: it would
  // quietly mean a lossless cable.
  if (dbPer100m === 0 && /[1-9]/.test(m[1].split(/e/i)[0]))
    throw new TraceInputError('BAD_OPTION', `--loss-db-per-100m figure is too small to read, got '${raw}'; write 0 for no loss`, {
      field: 'loss-db-per-100m',
    });
  // The cable library's own limit.
  if (!(dbPer100m <= 1000))
    throw new TraceInputError('BAD_OPTION', `--loss-db-per-100m needs at most 1000 dB per 100 m, got '${raw}'`, {
      field: 'loss-db-per-100m',
    });
  return { dbPer100m, frequencyHz };
}

/** Each frequency once, as the cable library keeps them: two figures at one frequency are a typing slip. */
function distinctFrequencies(loss: Array<{ dbPer100m: number; frequencyHz: number }> | undefined) {
  const seen = new Set<number>();
  for (const l of loss ?? []) {
    if (seen.has(l.frequencyHz))
      throw new TraceInputError('BAD_OPTION', `--loss-db-per-100m gives ${l.frequencyHz} Hz twice; give each frequency once`, {
        field: 'loss-db-per-100m',
      });
    seen.add(l.frequencyHz);
  }
  return loss;
}

/** A channel by its 1-based number when the option is a whole number, else by its column name. */
function channelOption(raw: string | undefined): string | number | undefined {
  if (raw === undefined) return undefined;
  const isNumber = /^\s*\d+\s*$/.test(raw);
  // No file has more than MAX_COLUMNS columns, so no channel number past it can be found.
  if (raw.trim() === '' || (isNumber && !(Number(raw) >= 1 && Number(raw) <= MAX_COLUMNS)))
    throw new TraceInputError(
      'BAD_OPTION',
      `--channel must be a channel number from 1 to ${MAX_COLUMNS} or a column name, got '${raw}'`,
      { field: 'channel' },
    );
  return isNumber ? Number(raw) : raw;
}

/** A plain decimal, as the trace reader reads the file's numbers: not 0x32 or 0o62, which Number() would take. */
const DECIMAL = /^[-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?$/;

function numberOption(name: string, raw: string | undefined): number | undefined {
  if (raw === undefined) return undefined;
  const v = Number(raw);
  if (!DECIMAL.test(raw.trim()) || !Number.isFinite(v))
    throw new TraceInputError('BAD_OPTION', `--${name} expects a number, got '${raw}'`);
  return v;
}

/**
 * A velocity factor a cable can have. Above 1 is faster than light; below 0.2 no practical cable is that slow
 * (common practice: the slowest field cables, water-filled or paper-insulated pairs, run about 0.4–0.6), so a
 * value there is almost always a slipped unit or decimal point. The web upload form takes the same range.
 */
function checkVf(what: string, vf: number, raw: string | number = vf, then = ''): number {
  if (!(vf >= CALIBRATION_VF_MIN && vf <= CALIBRATION_VF_MAX))
    throw new TraceInputError(
      'BAD_OPTION',
      `${what} must be a velocity factor from ${CALIBRATION_VF_MIN} to ${CALIBRATION_VF_MAX} (no practical cable is slower, nothing is faster than light), got '${raw}'${then}`,
    );
  return vf;
}

function vfOption(name: string, raw: string | undefined): number | undefined {
  const v = numberOption(name, raw);
  return v === undefined ? undefined : checkVf(`--${name}`, v, raw);
}

/**
 * A number option with its own range: the web upload form's limits (shared/schemas/traces.ts) for the
 * settings it shares, and the cable library's for Z0 (shared/schemas/cables.ts).
 */
const RANGES: Record<string, { ok: (v: number) => boolean; rule: string }> = {
  'zero-ns': { ok: (v) => Math.abs(v) < 1e6, rule: 'must be a zero offset under 1 ms (1000000 ns) either way' },
  'lead-m': { ok: (v) => v >= 0 && v < 1000, rule: 'must be a test-lead length from 0 to under 1000 m' },
  'sample-interval-ns': {
    // 1 ps is finer than any field TDR samples (common practice); smaller is a unit slip.
    ok: (v) => v >= 0.001 && v < 1e9,
    rule: 'must be a sample interval from 0.001 ns (1 ps) to under 1 s',
  },
  z0: { ok: (v) => v > 0 && v <= 10_000, rule: 'must be an impedance above 0 and at most 10000 Ω' },
  'vf-tolerance': { ok: (v) => v >= 0 && v < 0.5, rule: 'must be a fraction from 0 to under 0.5 (±50 %)' },
};

/** A value the file names for a setting an option can give: the option's own range, or that option is the way out. */
function checkFromFile(name: keyof typeof RANGES & string, what: string, v: number | undefined): number | undefined {
  if (v !== undefined && !RANGES[name].ok(v))
    throw new TraceInputError('BAD_OPTION', `${what} ${RANGES[name].rule}, got '${v}'; give --${name}`);
  return v;
}

function rangedOption(name: keyof typeof RANGES & string, raw: string | undefined): number | undefined {
  const v = numberOption(name, raw);
  if (v !== undefined && !RANGES[name].ok(v))
    throw new TraceInputError('BAD_OPTION', `--${name} ${RANGES[name].rule}, got '${raw}'`, { field: name });
  return v;
}

/** What a failed open or read means for the person who typed the name. */
const FILE_ERRORS: Record<string, string> = {
  ENOENT: 'no such file',
  ENOTDIR: 'no such file',
  EACCES: 'permission denied; the file cannot be read',
  EPERM: 'permission denied; the file cannot be read',
  EISDIR: 'is a folder, not a trace file',
  ENAMETOOLONG: 'the file name is too long',
  ELOOP: 'the file name loops through symbolic links',
};

function fileError(err: unknown): TraceInputError {
  const code = (err as NodeJS.ErrnoException).code ?? '';
  return new TraceInputError('NOT_TEXT', FILE_ERRORS[code] ?? `the file cannot be read (${code || (err as Error).message})`);
}

function tooLarge(maxBytes: number): TraceInputError {
  return new TraceInputError('FILE_TOO_LARGE', `the file is larger than the ${maxBytes / 1048576} MiB limit`);
}

/**
 * The file's bytes, never more than the reader's limit: a file is refused from its size before it is read,
 * and a device or pipe that has no size (/dev/zero never ends) is read only to one byte past the limit.
 */
function readTraceFile(file: string, maxBytes = DEFAULT_MAX_BYTES): Uint8Array {
  let fd: number;
  try {
    fd = openSync(file, 'r');
  } catch (err) {
    throw fileError(err);
  }
  try {
    const st = fstatSync(fd);
    if (st.isDirectory()) throw fileError({ code: 'EISDIR' });
    if (st.isFile() && st.size > maxBytes) throw tooLarge(maxBytes);
    const chunks: Buffer[] = [];
    let total = 0;
    for (;;) {
      const buf = Buffer.allocUnsafe(Math.min(1 << 20, maxBytes + 1 - total));
      let n: number;
      try {
        n = readSync(fd, buf, 0, buf.length, null);
      } catch (err) {
        throw fileError(err);
      }
      if (n === 0) break;
      chunks.push(buf.subarray(0, n));
      total += n;
      if (total > maxBytes) throw tooLarge(maxBytes);
    }
    return Buffer.concat(chunks, total);
  } finally {
    closeSync(fd);
  }
}

/**
 * A file name as it is shown on the error line: control characters (a line break, a terminal escape) written
 * as \n, \t or \uXXXX, so the name can neither break the one line nor drive the terminal.
 */
function shownName(file: string): string {
  // eslint-disable-next-line no-control-regex
  return file.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029]/g, (c) =>
    c === '\n' ? '\\n' : c === '\t' ? '\\t' : `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`,
  );
}

/** The JSON shape: snake_case, one object per file. */
function toJson(file: string, a: TraceAnalysis, units: 'm' | 'ft', trace?: ParsedTrace) {
  const ft = (m: number) => m / M_PER_FT;
  return {
    file,
    engine_version: a.engineVersion,
    channel: trace?.channel ? { name: trace.channel.name, index: trace.channel.index, available: trace.channel.available } : null,
    mode: a.mode,
    mode_detected: a.modeDetected,
    amplitude_unit: a.amplitudeUnit,
    launch: {
      index_sample: a.launch.indexSample,
      time_ns: a.launch.timeNs,
      amplitude: a.launch.amplitude,
      found_in_trace: a.launch.foundInTrace,
    },
    noise_level: a.noiseLevel,
    incident_level: a.incidentLevel,
    vf: a.vf,
    vf_tolerance: a.vfTolerance,
    z0_ohm: a.z0Ohm,
    sample_interval_ns: a.sampleIntervalNs,
    pulse_width_ns: a.pulseWidthNs,
    rise_time_ns: a.riseTimeNs,
    zero_offset_ns: a.zeroOffsetNs,
    lead_length_m: a.leadLengthM,
    blind_zone_m: a.blindZoneM,
    range_m: a.rangeM,
    window_coverage: a.windowCoverage ?? null,
    loss_source: a.lossSource ?? null,
    loss_db_per_100m: a.lossDbPer100m?.map((l) => ({ frequency_hz: l.frequencyHz, db_per_100m: l.dbPer100m })) ?? null,
    detection: a.detection
      ? {
          false_events_per_trace: a.detection.falseEventsPerTrace,
          threshold_sigma: a.detection.thresholdSigma,
          independent_tests: a.detection.independentTests,
        }
      : null,
    events: a.events.map((e) => ({
      index: e.index,
      distance_m: e.distanceM,
      ...(units === 'ft' ? { distance_ft: ft(e.distanceM), uncertainty_ft: ft(e.uncertaintyM) } : {}),
      type: e.type,
      reflection_coefficient: e.reflectionCoefficient,
      reflection_coefficient_raw: e.reflectionCoefficientRaw ?? e.reflectionCoefficient,
      loss_corrected: e.lossCorrected ?? false,
      inside_blind_zone: e.insideBlindZone ?? false,
      path_loss_db: e.pathLossDb ?? null,
      uncertainty_budget: e.uncertaintyBudget
        ? {
            vf_m: e.uncertaintyBudget.vfM,
            sampling_m: e.uncertaintyBudget.samplingM,
            timing_m: e.uncertaintyBudget.timingM,
            loss_m: e.uncertaintyBudget.lossM,
            dispersion_m: e.uncertaintyBudget.dispersionM,
            combined_m: e.uncertaintyBudget.combinedM,
          }
        : null,
      round_trip_ns: e.roundTripNs,
      uncertainty_m: e.uncertaintyM,
      window_start_m: e.windowStartM,
      window_end_m: e.windowEndM,
      impedance_ohm: e.impedanceOhm,
      is_cable_end: e.isCableEnd,
      likely_multiple_of: e.likelyMultipleOf,
      amplitude: e.amplitude,
      snr: e.snr,
      rise_time_ns: e.riseTimeNs,
    })),
    warnings: a.warnings,
  };
}

function pad(s: string, n: number, right = false) {
  return right ? s.padStart(n) : s.padEnd(n);
}

function table(file: string, a: TraceAnalysis, units: 'm' | 'ft', trace?: ParsedTrace): string {
  const k = units === 'ft' ? 1 / M_PER_FT : 1;
  const u = units;
  const lines: string[] = [];
  lines.push(
    `${file}: ${a.mode} trace${a.modeDetected ? '' : ' (mode set)'}, VF ${a.vf} ±${(a.vfTolerance * 100).toFixed(1)} %` +
      `${a.z0Ohm !== null ? `, Z0 ${a.z0Ohm} Ω` : ''}, ${a.sampleIntervalNs.toPrecision(3)} ns per sample, blind zone ${(a.blindZoneM * k).toFixed(2)} ${u}`,
  );
  if (a.events.length > 0) {
    lines.push(
      `  ${pad('#', 3)}${pad(`distance (${u})`, 14, true)}  ${pad(`window (${u})`, 21)}${pad('ρ', 8, true)}${pad('Z (Ω)', 9, true)}  ${pad('type', 15)}note`,
    );
    for (const e of a.events) {
      const note = [e.isCableEnd ? 'cable end' : '', e.likelyMultipleOf !== null ? `echo of #${e.likelyMultipleOf + 1}` : '']
        .filter(Boolean)
        .join(', ');
      lines.push(
        `  ${pad(String(e.index + 1), 3)}${pad((e.distanceM * k).toFixed(2), 14, true)}  ${pad(`${(e.windowStartM * k).toFixed(2)} – ${(e.windowEndM * k).toFixed(2)}`, 21)}` +
          `${pad((e.reflectionCoefficient >= 0 ? '+' : '') + e.reflectionCoefficient.toFixed(3), 8, true)}${pad(e.impedanceOhm !== null ? e.impedanceOhm.toFixed(1) : '–', 9, true)}  ${pad(e.type, 15)}${note}`,
      );
    }
  }
  if (trace?.channel && trace.channel.available.length > 1) lines.push(`  note: read channel ${trace.channel.name}`);
  for (const w of a.warnings) lines.push(`  note: ${w.message}`);
  return lines.join('\n');
}

/** Options that take a value: a negative number after one is its value (`--vf -1`, `--zero-ns -Infinity`), not another option. */
const VALUE_OPTIONS = new Set(['--vf', '--z0', '--zero-ns', '--lead-m', '--sample-interval-ns', '--instrument-vf', '--vf-tolerance']);

function joinNegativeValues(argv: string[]): string[] {
  const out: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    if (VALUE_OPTIONS.has(argv[i]) && i + 1 < argv.length && /^-([0-9.]|inf|nan)/i.test(argv[i + 1])) {
      out.push(`${argv[i]}=${argv[i + 1]}`);
      i++;
    } else out.push(argv[i]);
  }
  return out;
}

function main(argv: string[]): number {
  let parsed;
  try {
    parsed = parseArgs({
      args: joinNegativeValues(argv),
      allowPositionals: true,
      options: {
        vf: { type: 'string' },
        z0: { type: 'string' },
        mode: { type: 'string' },
        'zero-ns': { type: 'string' },
        'lead-m': { type: 'string' },
        'sample-interval-ns': { type: 'string' },
        'instrument-vf': { type: 'string' },
        'vf-tolerance': { type: 'string' },
        'loss-db-per-100m': { type: 'string', multiple: true },
        channel: { type: 'string' },
        units: { type: 'string' },
        json: { type: 'boolean' },
        help: { type: 'boolean', short: 'h' },
      },
      tokens: true,
    });
    // An option that takes one value, given twice, is a slip: the parser would keep the last one silently.
    const seen = new Set<string>();
    for (const t of parsed.tokens) {
      if (t.kind !== 'option' || t.value === undefined || t.name === 'loss-db-per-100m') continue;
      if (seen.has(t.name)) throw new Error(`--${t.name} is given twice; give it once.`);
      seen.add(t.name);
    }
  } catch (err) {
    // One line, as for every bad input: the option parser's first sentence and where the options are listed.
    const first = (err as Error).message.split('\n')[0].replace(/\. To specify .*$/, '.');
    process.stderr.write(`analyze: ${first} (analyze --help lists the options)\n`);
    return 2;
  }
  const { values, positionals } = parsed;
  if (values.help) {
    process.stdout.write(`${USAGE}\n`);
    return 0;
  }
  if (positionals.length === 0) {
    process.stderr.write(`analyze: no trace file given (analyze --help lists the options)\n`);
    return 2;
  }
  const units = (values.units ?? 'm') as 'm' | 'ft';
  if (units !== 'm' && units !== 'ft') {
    process.stderr.write(`analyze: --units must be m or ft\n`);
    return 2;
  }
  const mode = (values.mode ?? 'auto') as 'auto' | 'step' | 'pulse';
  if (!['auto', 'step', 'pulse'].includes(mode)) {
    process.stderr.write(`analyze: --mode must be auto, step or pulse\n`);
    return 2;
  }
  // The options once, before any file: a bad one is one line however many files follow.
  let opts;
  try {
    opts = {
      vf: vfOption('vf', values.vf),
      loss: distinctFrequencies(values['loss-db-per-100m']?.map(parseLoss)),
      sampleIntervalNs: rangedOption('sample-interval-ns', values['sample-interval-ns']),
      instrumentVf: vfOption('instrument-vf', values['instrument-vf']),
      channel: channelOption(values.channel),
      vfTolerance: rangedOption('vf-tolerance', values['vf-tolerance']),
      z0Ohm: rangedOption('z0', values.z0),
      zeroOffsetNs: rangedOption('zero-ns', values['zero-ns']),
      leadLengthM: rangedOption('lead-m', values['lead-m']),
    };
  } catch (err) {
    process.stderr.write(`analyze: ${(err as Error).message.replace(/\s+/g, ' ')}\n`);
    return 2;
  }
  let failed = 0;
  const results: ReturnType<typeof toJson>[] = [];
  for (const file of positionals) {
    try {
      // Bytes straight to the reader: no decoded copy of the whole file.
      const trace = parseTraceCsv(readTraceFile(file), {
        sampleIntervalNs: opts.sampleIntervalNs,
        instrumentVf: opts.instrumentVf,
        channel: opts.channel,
      });
      const vf = opts.vf ?? trace.hints.instrumentVf ?? trace.instrumentVf;
      if (vf === undefined) throw new TraceInputError('MISSING_VF', 'no velocity factor: give --vf (the file names none)');
      if (opts.vf === undefined) checkVf('the velocity factor the file names', vf, vf, '; give --vf');
      const analysis = analyzeTrace(trace, {
        vf,
        vfTolerance: opts.vfTolerance,
        z0Ohm: opts.z0Ohm ?? checkFromFile('z0', 'the impedance the file names', trace.hints.z0Ohm),
        mode,
        zeroOffsetNs: opts.zeroOffsetNs,
        leadLengthM: opts.leadLengthM,
        loss: opts.loss,
      });
      if (opts.vf === undefined)
        analysis.warnings.push({ code: 'VF_FROM_FILE', message: `velocity factor ${vf} taken from the file` });
      if (values.json) results.push(toJson(file, analysis, units, trace));
      else process.stdout.write(`${table(file, analysis, units, trace)}\n`);
    } catch (err) {
      failed++;
      const msg = err instanceof TraceInputError ? err.message : (err as Error).message;
      process.stderr.write(`analyze: ${shownName(file)}: ${msg.replace(/\s+/g, ' ')}\n`);
    }
  }
  if (values.json && results.length > 0) {
    process.stdout.write(`${JSON.stringify(positionals.length === 1 ? results[0] : results, null, 2)}\n`);
  }
  return failed > 0 ? 1 : 0;
}

// A reader that stops early (analyze … | head) closes the pipe: nothing more is wanted, so end quietly,
// with the exit code the run already has, instead of with node's stack trace for EPIPE.
process.stdout.on('error', (err: NodeJS.ErrnoException) => {
  if (err.code !== 'EPIPE') process.stderr.write(`analyze: the output cannot be written (${err.code ?? err.message})\n`);
  process.exit(err.code === 'EPIPE' ? Number(process.exitCode ?? 0) : 1);
});

process.exitCode = main(process.argv.slice(2));
