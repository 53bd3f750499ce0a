/**
 * Measures how the engine places events on simulated traces: the signed
 * distance error (late > 0), its spread by cable family, and how often the
 * uncertainty window holds the true distance. `--loss=library` passes each
 * simulated cable's attenuation to the engine as the cable library would;
 * without it the engine estimates the loss from the trace.
 *
 * `--vf-tolerance=0` leaves the window to every source but the VF (the simulated
 * VFs are exact), to check those. `--set=tuning` runs scripts/sim2's tuning set;
 * the held-out set is never run here.
 *
 *   npx tsx scripts/location-bias.ts [--loss=library] [--set=sweep|tuning] [--vf-tolerance=0] [--verbose]
 */
import { analyzeCsv } from '../shared/trace';
import { attenuationFromLineConstants } from '../shared/trace/loss';
import { SPEED_OF_LIGHT_M_PER_S } from '../shared/cable/propagation';
import { buildSweep, distanceTolerance } from './sim/sweep';
import { buildSet } from './sim2/sets';

interface Row {
  family: string;
  mode: string;
  distanceM: number;
  errorM: number;
  inWindow: boolean;
  rho: number;
  rhoExpected: number;
  id: string;
}

const arg = (name: string) => process.argv.find((a) => a.startsWith(`--${name}=`))?.split('=')[1];
const withLoss = arg('loss') === 'library';
const verbose = process.argv.includes('--verbose');
/** The simulated cables' VFs are exact: `--vf-tolerance=0` leaves the window to every other source, to check them. */
const vfTolerance = arg('vf-tolerance') !== undefined ? Number(arg('vf-tolerance')) : undefined;
const FREQS = [1e5, 1e6, 1e7, 1e8, 1e9];

interface Case {
  id: string;
  csv: string;
  parseOptions?: { channel?: string };
  family: string;
  mode: string;
  vf: number;
  z0Ohm: number;
  loss: Array<{ dbPer100m: number; frequencyHz: number }>;
  expected: Array<{ distanceM: number; what: string; rho: number; required: boolean }>;
}

/** scripts/sim's sweep, with each cable's attenuation worked out from its line constants. */
function sweepCases(): Case[] {
  return buildSweep().map((c) => {
    const cab = c.scenario.cable;
    const v = cab.vf * SPEED_OF_LIGHT_M_PER_S;
    const lc = {
      rDcOhmPerM: cab.rdcOhmPerM,
      skinOhmPerMRootHz: cab.skinOhmPerMRootHz,
      lHPerM: cab.z0Ohm / v,
      cFPerM: 1 / (cab.z0Ohm * v),
      lossTangent: cab.tanDelta,
    };
    return {
      id: c.id,
      csv: c.csv,
      family: cab.name,
      mode: c.acquisition.mode,
      vf: c.vf,
      z0Ohm: c.z0Ohm,
      loss: FREQS.map((f) => ({ frequencyHz: f, dbPer100m: attenuationFromLineConstants(lc, f) })),
      expected: c.expected.map((e) => ({ distanceM: e.distanceM, what: e.what, rho: e.rho, required: !e.optional })),
    };
  });
}

/** scripts/sim2's tuning set (never the held-out one). */
function tuningCases(): Case[] {
  return buildSet('tuning').map((c) => ({
    id: c.id,
    csv: c.csv,
    parseOptions: c.parseOptions,
    family: c.cableKind,
    mode: c.mode,
    vf: c.vf,
    z0Ohm: c.z0Ohm,
    loss: c.loss,
    expected: c.expected.map((e) => ({ distanceM: e.distanceM, what: e.what, rho: e.rho, required: e.required })),
  }));
}

const rows: Row[] = [];
let missed = 0;
let failedToRead = 0;
for (const c of arg('set') === 'tuning' ? tuningCases() : sweepCases()) {
  const options = {
    vf: c.vf,
    z0Ohm: c.z0Ohm,
    ...(withLoss ? { loss: c.loss } : {}),
    ...(vfTolerance !== undefined ? { vfTolerance } : {}),
  };
  let a: ReturnType<typeof analyzeCsv>;
  try {
    a = analyzeCsv(c.csv, c.parseOptions ?? {}, options);
  } catch {
    failedToRead++;
    continue;
  }
  const used = new Set<number>();
  for (const e of c.expected) {
    if (!e.required) continue;
    let best = -1;
    a.events.forEach((g, i) => {
      if (!used.has(i) && (best < 0 || Math.abs(g.distanceM - e.distanceM) < Math.abs(a.events[best].distanceM - e.distanceM)))
        best = i;
    });
    if (best < 0 || Math.abs(a.events[best].distanceM - e.distanceM) > 3 * distanceTolerance(e.distanceM)) {
      missed++;
      continue;
    }
    used.add(best);
    const g = a.events[best];
    rows.push({
      family: c.family,
      mode: c.mode,
      distanceM: e.distanceM,
      errorM: g.distanceM - e.distanceM,
      inWindow: g.windowStartM <= e.distanceM && e.distanceM <= g.windowEndM,
      rho: g.reflectionCoefficient,
      rhoExpected: e.rho,
      id: c.id,
    });
    if (verbose) {
      const r = rows[rows.length - 1];
      console.log(
        `${c.id.padEnd(52)} ${e.what.padEnd(18)} ${e.distanceM.toFixed(1).padStart(7)} m  err ${r.errorM >= 0 ? '+' : ''}${r.errorM.toFixed(3)} m (${((100 * r.errorM) / e.distanceM).toFixed(2)} %)  ±${g.uncertaintyM.toFixed(2)} ${r.inWindow ? 'in ' : 'OUT'}  ρ ${g.reflectionCoefficient.toFixed(2)} (exp ${e.rho.toFixed(2)})`,
      );
    }
  }
}

const pct = (x: number) => `${x >= 0 ? '+' : ''}${x.toFixed(2)} %`;
function summary(label: string, list: Row[]) {
  if (list.length === 0) return;
  const rel = list.map((r) => (100 * r.errorM) / r.distanceM);
  const mean = rel.reduce((s, x) => s + x, 0) / rel.length;
  const sorted = [...rel].sort((a, b) => a - b);
  const median = sorted.length % 2 ? sorted[sorted.length >> 1] : (sorted[sorted.length / 2 - 1] + sorted[sorted.length / 2]) / 2;
  const late = list.filter((r) => r.errorM > 0).length;
  const within = list.filter((r) => Math.abs(r.errorM) <= distanceTolerance(r.distanceM)).length;
  const held = list.filter((r) => r.inWindow).length;
  console.log(
    `${label.padEnd(22)} n ${String(list.length).padStart(3)}  median ${pct(median).padStart(8)}  mean ${pct(mean).padStart(8)}  late ${late}/${list.length}  within tol ${within}/${list.length}  windows held ${held}/${list.length} (${((100 * held) / list.length).toFixed(0)} %)`,
  );
}
console.log(
  `loss: ${withLoss ? 'from the simulated cable (library)' : 'not given (estimated from the trace)'}; VF tolerance ${vfTolerance ?? 'default'}; ${missed} required events not found near their place${failedToRead ? `, ${failedToRead} traces not read` : ''}`,
);
summary('all', rows);
summary(
  'all, 100 m and over',
  rows.filter((r) => r.distanceM >= 100),
);
for (const fam of [...new Set(rows.map((r) => r.family))])
  summary(
    fam,
    rows.filter((r) => r.family === fam),
  );
for (const mode of ['step', 'pulse'])
  summary(
    mode,
    rows.filter((r) => r.mode === mode),
  );
