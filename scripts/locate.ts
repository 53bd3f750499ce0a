/**
 * Command line: one best location for a fault from every reading taken on it.
 *
 *   npm run --silent locate -- --length-m L [--tdr-a-m D --tdr-a-u U] [--tdr-b-m D --tdr-b-u U]
 *     [--two-ended-ns TA,TB] [--murray ...] [--varley ...] [--capacitance ...] [--loop-resistance ...] [--json]
 *
 * Exit status: 0 a location, 1 the readings disagree (the report still goes to
 * stdout), 2 a reading or option that cannot be used.
 */
import { parseArgs } from 'node:util';
import {
  capacitanceMethod,
  fuseEstimates,
  LocateInputError,
  loopResistanceMethod,
  murrayLoop,
  singleEndedTdr,
  twoEndedTdr,
  varleyLoop,
  type CableEnd,
  type CableRunInput,
  type ConductorMaterial,
  type ConductorSection,
  type FusedLocation,
  type LocationEstimate,
} from '../shared/locate';

const HELP = `usage: locate --length-m L [readings...] [--json]

Fuses every reading of one fault into one best location from end A, with its
standard uncertainty and 95 % window, each method's own estimate, and whether
they agree (chi-square at 95 %). Readings that disagree are not averaged.

The cable run
  --length-m L             installed length of the run, m (required)
  --length-u-m U           standard uncertainty of that length (records, slack), m; default 0
  --conductor SPEC         the conductor along the run from end A, for the bridge and resistance methods:
                           sections LENGTH:SIZE:MATERIAL joined by commas, e.g. 300m:95mm2:al,600m:185mm2:cu;
                           SIZE in mm2 or as resistance per km at 20 °C (0.193ohm/km); one section without
                           a length covers the whole run (95mm2:cu); MATERIAL cu or al
  --temperature-c T        conductor temperature, °C (default 20 °C, then known only to ±8 K)
  --temperature-u-k U      standard uncertainty of that temperature, K (default 2)

TDR
  --tdr-a-m D --tdr-a-u U  single-ended reading from end A: distance and standard uncertainty, m
  --tdr-b-m D --tdr-b-u U  the same from end B (distance measured from end B)
  --vf-u-pct P             standard uncertainty of the velocity factor both readings used, %: that part
                           of each reading's uncertainty is one shared error (it cancels between the ends)
  --two-ended-ns TA,TB     round-trip times to the fault from end A and from end B, ns
  --round-trip-u-ns U      standard uncertainty of each round-trip time, ns (default 1)

Bridge and meter readings (each may be given more than once; keys joined by commas)
  --murray end=A,ratio=R   Murray loop: R = share of the loop resistance between the test end and the
                           fault (Q/(P+Q), 0–1); or faulty-arm=Q,sound-arm=P; optional step=0.001 (ratio
                           resolution), accuracy=0 (± ratio), loop-ohm=Ω (measured loop), sound=same|unknown
  --varley end=A,arms=a/b,rheostat-ohm=S
                           Varley loop: arms = ratio arm on the rheostat side over the one on the loop side;
                           optional loop-ohm=Ω (first balance; otherwise from --conductor), step-ohm=0.01,
                           accuracy-pct=0, sound=same|unknown
  --capacitance end=A,nf=C,per-km-nf=C' | sound-nf=C | other-end-nf=C
                           open conductor: its capacitance against the cable's per km (optional
                           per-km-u-pct=5), a sound conductor of the whole cable, or the same conductor from
                           the other end; optional lead-nf, step-nf=0.001, accuracy-pct=1, uniformity-pct=1
  --loop-resistance end=A,ohm=R
                           low-resistance short between two like conductors: the loop resistance; optional
                           lead-ohm=0, fault-ohm-max=0 (a resistive short reads long), step-ohm=0.001,
                           accuracy-pct=0

Output
  --json                   one JSON object (snake_case) instead of the report
  -h, --help               this text

Safety: bridge, capacitance and resistance tests connect instruments to the
cable's conductors. De-energise the cable, isolate, lock out and prove it dead,
discharge and earth every conductor (cables hold charge), and remove the earths
only as the test procedure allows. High-voltage test sets and fault burning are
for qualified, authorised persons only. Local codes and your organisation's
safety rules come first.`;

class OptionError extends Error {}

const MATERIAL_NAMES: Record<string, ConductorMaterial> = {
  cu: 'copper',
  copper: 'copper',
  al: 'aluminium',
  aluminium: 'aluminium',
  aluminum: 'aluminium',
};

function number(option: string, raw: string | undefined): number | undefined {
  if (raw === undefined) return undefined;
  const v = Number(raw);
  if (raw.trim() === '' || !Number.isFinite(v)) throw new OptionError(`${option} expects a number, got '${raw}'`);
  return v;
}

function end(option: string, raw: string | undefined): CableEnd {
  const e = (raw ?? '').toUpperCase();
  if (e !== 'A' && e !== 'B') throw new OptionError(`${option}: end must be A or B, got '${raw ?? ''}'`);
  return e;
}

/** `key=value,key=value` with only the keys the option knows. */
function keyValues(option: string, text: string, known: string[]): Record<string, string> {
  const out: Record<string, string> = {};
  for (const part of text.split(',')) {
    const eq = part.indexOf('=');
    if (eq <= 0) throw new OptionError(`${option}: expected key=value, got '${part}'`);
    const key = part.slice(0, eq).trim();
    if (!known.includes(key)) throw new OptionError(`${option}: unknown key '${key}' (known: ${known.join(', ')})`);
    if (key in out) throw new OptionError(`${option}: '${key}' given twice`);
    out[key] = part.slice(eq + 1).trim();
  }
  return out;
}

function conductorSpec(text: string, lengthM: number): ConductorSection[] {
  const parts = text.split(',').map((p) => p.trim());
  return parts.map((part) => {
    const tokens = part.split(':').map((t) => t.trim().toLowerCase());
    const section: Partial<ConductorSection> = {};
    for (const t of tokens) {
      if (t in MATERIAL_NAMES) section.material = MATERIAL_NAMES[t];
      else if (t.endsWith('ohm/km')) section.ohmPerM20 = number('--conductor', t.slice(0, -6))! / 1000;
      else if (t.endsWith('mm2')) section.sizeMm2 = number('--conductor', t.slice(0, -3));
      else if (t.endsWith('m')) section.lengthM = number('--conductor', t.slice(0, -1));
      else throw new OptionError(`--conductor: cannot read '${t}' in '${part}' (use e.g. 300m:95mm2:cu)`);
    }
    if (!section.material) throw new OptionError(`--conductor: '${part}' names no material (cu or al)`);
    if (section.lengthM === undefined) {
      if (parts.length > 1) throw new OptionError(`--conductor: '${part}' has no length (each of several sections needs one)`);
      section.lengthM = lengthM;
    }
    return section as ConductorSection;
  });
}

function sound(option: string, raw: string | undefined): 'same' | 'unknown' | undefined {
  if (raw === undefined) return undefined;
  if (raw !== 'same' && raw !== 'unknown') throw new OptionError(`${option}: sound must be same or unknown, got '${raw}'`);
  return raw;
}

const pct = (v: number | undefined) => (v === undefined ? undefined : v / 100);

interface Parsed {
  run: CableRunInput;
  estimates: LocationEstimate[];
  assumptions: string[];
}

function readings(values: Record<string, string | string[] | boolean | undefined>): Parsed {
  const str = (k: string) => values[k] as string | undefined;
  const list = (k: string) => (values[k] as string[] | undefined) ?? [];
  const lengthM = number('--length-m', str('length-m'));
  if (lengthM === undefined) throw new OptionError('--length-m is required: the installed length of the run, m');
  const run: CableRunInput = { installedLengthM: lengthM, installedLengthUM: number('--length-u-m', str('length-u-m')) };
  const assumptions: string[] = [];
  if (run.installedLengthUM === undefined) assumptions.push('installed length taken as exact (give --length-u-m)');
  const estimates: LocationEstimate[] = [];
  const add = (option: string, build: () => LocationEstimate) => {
    try {
      estimates.push(build());
    } catch (err) {
      if (err instanceof LocateInputError) throw new OptionError(`${option}: ${err.message}`);
      throw err;
    }
  };
  const vfRel = pct(number('--vf-u-pct', str('vf-u-pct')));
  for (const e of ['a', 'b'] as const) {
    const d = number(`--tdr-${e}-m`, str(`tdr-${e}-m`));
    const u = number(`--tdr-${e}-u`, str(`tdr-${e}-u`));
    if (d === undefined && u === undefined) continue;
    if (d === undefined || u === undefined) throw new OptionError(`--tdr-${e}-m and --tdr-${e}-u go together`);
    const fromEnd = e.toUpperCase() as CableEnd;
    add(`--tdr-${e}-m`, () =>
      singleEndedTdr(`tdr-${e}`, run, { fromEnd, distanceM: d, standardUncertaintyM: u, vfRelativeU: vfRel }),
    );
  }
  const te = str('two-ended-ns');
  if (te !== undefined) {
    const times = te.split(',');
    if (times.length !== 2) throw new OptionError(`--two-ended-ns expects TA,TB (two times in ns), got '${te}'`);
    const ut = number('--round-trip-u-ns', str('round-trip-u-ns')) ?? 1;
    if (str('round-trip-u-ns') === undefined) assumptions.push('round-trip times known to 1 ns each (give --round-trip-u-ns)');
    add('--two-ended-ns', () =>
      twoEndedTdr('two-ended', run, {
        roundTripANs: number('--two-ended-ns', times[0])!,
        roundTripBNs: number('--two-ended-ns', times[1])!,
        roundTripUNs: ut,
      }),
    );
  }
  const conductorText = str('conductor');
  const temperatureC = number('--temperature-c', str('temperature-c'));
  const temperatureUK = number('--temperature-u-k', str('temperature-u-k'));
  const conductor = () => {
    if (conductorText === undefined)
      throw new OptionError('the bridge and resistance methods need --conductor (size and material along the run)');
    return conductorSpec(conductorText, lengthM);
  };
  const needsConductor = list('murray').length + list('varley').length + list('loop-resistance').length > 0;
  if (needsConductor && temperatureC === undefined)
    assumptions.push('conductor temperature taken as 20 °C ± 8 K (give --temperature-c)');
  /** Each use of a repeatable option, named `--murray (#2)` in messages when there are several. */
  const each = (option: string, build: (spec: string, n: number, tag: string | undefined) => LocationEstimate) => {
    const texts = list(option);
    texts.forEach((text, i) => {
      const name = texts.length > 1 ? `--${option} (#${i + 1})` : `--${option}`;
      add(name, () => build(text, i + 1, texts.length > 1 ? `#${i + 1}` : undefined));
    });
  };
  each('murray', (text, n, tag) => {
    const o = '--murray';
    const kv = keyValues(o, text, ['end', 'ratio', 'faulty-arm', 'sound-arm', 'step', 'accuracy', 'loop-ohm', 'sound']);
    const fromEnd = end(o, kv.end);
    return murrayLoop(`murray-${n}`, run, {
      fromEnd,
      ratio: number(`${o} ratio`, kv.ratio),
      faultySideArmOhm: number(`${o} faulty-arm`, kv['faulty-arm']),
      soundSideArmOhm: number(`${o} sound-arm`, kv['sound-arm']),
      ratioStep: number(`${o} step`, kv.step),
      ratioAccuracy: number(`${o} accuracy`, kv.accuracy),
      loopOhm: number(`${o} loop-ohm`, kv['loop-ohm']),
      sound: sound(o, kv.sound),
      faulty: conductor(),
      temperatureC,
      temperatureUK,
      label: tag ? `Murray loop ${tag} from end ${fromEnd}` : undefined,
    });
  });
  each('varley', (text, n, tag) => {
    const o = '--varley';
    const kv = keyValues(o, text, ['end', 'arms', 'rheostat-ohm', 'loop-ohm', 'step-ohm', 'accuracy-pct', 'sound']);
    const fromEnd = end(o, kv.end);
    if (kv.arms === undefined)
      throw new OptionError(`${o}: arms= is required (ratio arm on the rheostat side over the one on the loop side)`);
    if (kv['rheostat-ohm'] === undefined) throw new OptionError(`${o}: rheostat-ohm= is required`);
    return varleyLoop(`varley-${n}`, run, {
      fromEnd,
      armRatio: ratioText(`${o} arms`, kv.arms),
      rheostatOhm: number(`${o} rheostat-ohm`, kv['rheostat-ohm'])!,
      loopOhm: number(`${o} loop-ohm`, kv['loop-ohm']),
      ohmStep: number(`${o} step-ohm`, kv['step-ohm']),
      accuracyPct: number(`${o} accuracy-pct`, kv['accuracy-pct']),
      sound: sound(o, kv.sound),
      faulty: conductor(),
      temperatureC,
      temperatureUK,
      label: tag ? `Varley loop ${tag} from end ${fromEnd}` : undefined,
    });
  });
  each('capacitance', (text, n, tag) => {
    const o = '--capacitance';
    const kv = keyValues(o, text, [
      'end',
      'nf',
      'per-km-nf',
      'per-km-u-pct',
      'sound-nf',
      'other-end-nf',
      'lead-nf',
      'step-nf',
      'accuracy-pct',
      'uniformity-pct',
    ]);
    const fromEnd = end(o, kv.end);
    const f = (k: string) => {
      const v = number(`${o} ${k}`, kv[k]);
      return v === undefined ? undefined : v * 1e-9;
    };
    if (kv.nf === undefined) throw new OptionError(`${o}: nf= is required (the broken conductor's capacitance, nF)`);
    const perKm = f('per-km-nf');
    return capacitanceMethod(`capacitance-${n}`, run, {
      fromEnd,
      measuredF: f('nf')!,
      perMF: perKm === undefined ? undefined : perKm / 1000,
      perMRelativeU: pct(number(`${o} per-km-u-pct`, kv['per-km-u-pct'])),
      soundF: f('sound-nf'),
      otherEndF: f('other-end-nf'),
      leadF: f('lead-nf'),
      stepF: f('step-nf'),
      accuracyPct: number(`${o} accuracy-pct`, kv['accuracy-pct']),
      uniformityRelativeU: pct(number(`${o} uniformity-pct`, kv['uniformity-pct'])),
      label: tag ? `Capacitance ${tag} from end ${fromEnd}` : undefined,
    });
  });
  each('loop-resistance', (text, n, tag) => {
    const o = '--loop-resistance';
    const kv = keyValues(o, text, ['end', 'ohm', 'lead-ohm', 'fault-ohm-max', 'step-ohm', 'accuracy-pct']);
    const fromEnd = end(o, kv.end);
    if (kv.ohm === undefined) throw new OptionError(`${o}: ohm= is required (the loop resistance, Ω)`);
    return loopResistanceMethod(`loop-resistance-${n}`, run, {
      fromEnd,
      loopOhm: number(`${o} ohm`, kv.ohm)!,
      leadOhm: number(`${o} lead-ohm`, kv['lead-ohm']),
      faultOhmMax: number(`${o} fault-ohm-max`, kv['fault-ohm-max']),
      ohmStep: number(`${o} step-ohm`, kv['step-ohm']),
      accuracyPct: number(`${o} accuracy-pct`, kv['accuracy-pct']),
      first: conductor(),
      temperatureC,
      temperatureUK,
      label: tag ? `Loop resistance ${tag} from end ${fromEnd}` : undefined,
    });
  });
  if (estimates.length === 0)
    throw new OptionError(
      'no readings: give at least one of --tdr-a-m, --tdr-b-m, --two-ended-ns, --murray, --varley, --capacitance, --loop-resistance',
    );
  return { run, estimates, assumptions };
}

/** `2`, `2/1` or `2:1`. */
function ratioText(option: string, raw: string): number {
  const m = /^\s*([^/:]+)\s*(?:[/:]\s*([^/:]+))?\s*$/.exec(raw);
  if (!m) throw new OptionError(`${option} expects a ratio like 1, 2/1 or 2:1, got '${raw}'`);
  const a = number(option, m[1])!;
  const b = m[2] === undefined ? 1 : number(option, m[2])!;
  if (!(b !== 0)) throw new OptionError(`${option}: the second arm cannot be 0`);
  return a / b;
}

function toJson(f: FusedLocation, assumptions: string[]) {
  return {
    installed_length_m: f.installedLengthM,
    consistent: f.consistent,
    best:
      f.distanceFromAM === null
        ? null
        : {
            distance_from_a_m: f.distanceFromAM,
            standard_uncertainty_m: f.standardUncertaintyM,
            window_start_m: f.windowStartM,
            window_end_m: f.windowEndM,
            coverage_factor: f.coverageFactor,
          },
    verdict: f.verdict,
    test: f.test && {
      chi_square: f.test.statistic,
      degrees_of_freedom: f.test.degreesOfFreedom,
      limit_95: f.test.limit95,
      birge_ratio: f.test.birgeRatio,
    },
    outlier: f.outlier && {
      id: f.outlier.id,
      label: f.outlier.label,
      method: f.outlier.method,
      offset_m: f.outlier.offsetM,
      sigmas: f.outlier.sigmas,
    },
    methods: f.methods.map((m) => ({
      id: m.id,
      method: m.method,
      label: m.label,
      from_end: m.fromEnd,
      distance_from_end_m: m.distanceFromEndM,
      distance_from_a_m: m.distanceFromAM,
      standard_uncertainty_m: m.standardUncertaintyM,
      window_start_m: m.windowStartM,
      window_end_m: m.windowEndM,
      used: m.used,
      weight: m.weight,
      normalised_residual: m.normalisedResidual,
      budget: m.budget.map((b) => ({ source: b.source, label: b.label, contribution_m: b.contributionM })),
      notes: m.notes,
    })),
    disagreements: f.disagreements.map((d) => ({ a: d.a, b: d.b, difference_m: d.differenceM, limit_m: d.limitM })),
    checks: f.checks,
    assumptions,
  };
}

const m1 = (x: number) => x.toFixed(1);

function report(f: FusedLocation, assumptions: string[]): string {
  const lines: string[] = [];
  if (f.distanceFromAM !== null)
    lines.push(
      `Best location: ${m1(f.distanceFromAM)} m from end A, standard uncertainty ${m1(f.standardUncertaintyM!)} m, ` +
        `95 % window ${m1(f.windowStartM!)} – ${m1(f.windowEndM!)} m (run ${f.installedLengthM} m)`,
    );
  else lines.push(`No best location: the readings disagree (run ${f.installedLengthM} m)`);
  lines.push(f.verdict);
  lines.push('');
  lines.push(
    `  ${'method'.padEnd(30)}${'reading'.padStart(16)}${'from A (m)'.padStart(12)}${'u (m)'.padStart(8)}${'weight'.padStart(10)}`,
  );
  for (const m of f.methods) {
    lines.push(
      `  ${m.label.padEnd(30)}${`${m1(m.distanceFromEndM)} m from ${m.fromEnd}`.padStart(16)}${m1(m.distanceFromAM).padStart(12)}` +
        `${m1(m.standardUncertaintyM).padStart(8)}${(m.weight === null ? 'left out' : m.weight.toFixed(3)).padStart(10)}`,
    );
    for (const note of m.notes) lines.push(`      note: ${note}`);
  }
  if (f.checks.length) {
    lines.push('');
    lines.push('Check:');
    for (const c of f.checks) lines.push(`  - ${c}`);
  }
  for (const a of assumptions) lines.push(`Assumed: ${a}`);
  return lines.join('\n');
}

function main(argv: string[]): number {
  let values;
  try {
    values = parseArgs({
      args: argv,
      allowPositionals: false,
      options: {
        'length-m': { type: 'string' },
        'length-u-m': { type: 'string' },
        conductor: { type: 'string' },
        'temperature-c': { type: 'string' },
        'temperature-u-k': { type: 'string' },
        'tdr-a-m': { type: 'string' },
        'tdr-a-u': { type: 'string' },
        'tdr-b-m': { type: 'string' },
        'tdr-b-u': { type: 'string' },
        'vf-u-pct': { type: 'string' },
        'two-ended-ns': { type: 'string' },
        'round-trip-u-ns': { type: 'string' },
        murray: { type: 'string', multiple: true },
        varley: { type: 'string', multiple: true },
        capacitance: { type: 'string', multiple: true },
        'loop-resistance': { type: 'string', multiple: true },
        json: { type: 'boolean' },
        help: { type: 'boolean', short: 'h' },
      },
    }).values;
  } catch (err) {
    process.stderr.write(`locate: ${(err as Error).message.split('\n')[0]} (see --help)\n`);
    return 2;
  }
  if (values.help) {
    process.stdout.write(`${HELP}\n`);
    return 0;
  }
  let fused: FusedLocation;
  let assumptions: string[];
  try {
    const parsed = readings(values);
    assumptions = parsed.assumptions;
    fused = fuseEstimates(parsed.estimates, parsed.run.installedLengthM);
  } catch (err) {
    if (err instanceof OptionError || err instanceof LocateInputError) {
      process.stderr.write(`locate: ${err.message.replace(/\s+/g, ' ')}\n`);
      return 2;
    }
    throw err;
  }
  process.stdout.write(`${values.json ? JSON.stringify(toJson(fused, assumptions), null, 2) : report(fused, assumptions)}\n`);
  if (!fused.consistent) {
    const apart = fused.outlier ? `${fused.outlier.label} stands apart` : 'no single reading stands apart';
    process.stderr.write(
      `locate: the readings disagree (chi-square ${fused.test!.statistic.toFixed(2)} above ${fused.test!.limit95.toFixed(2)}); ${apart}\n`,
    );
    return 1;
  }
  return 0;
}

process.exitCode = main(process.argv.slice(2));
