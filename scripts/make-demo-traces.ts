/**
 * Writes the demo traces the app's demo seed loads, and the sample traces the
 * upload page offers to try (never uploaded by the seed): simulated, for
 * demonstration only, never for checking the engine.
 *
 *   npm run make:demo-traces   → server/db/demo/traces/ and server/db/demo/samples/ (*.csv and manifest.json)
 *   npm run make:demo-traces -- --out DIR   (write them elsewhere, to compare: DIR/traces and DIR/samples)
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { COAX_50, PAIR_100, POWER_MV, variant } from './sim/cables';
import { writeLayout, type Layout } from './sim/layouts';
import { defaultAcquisition, simulateScenario, type Scenario } from './sim/scenario';

const outArg = process.argv.indexOf('--out');
const OUT_ROOT =
  outArg > 0 && process.argv[outArg + 1] ? process.argv[outArg + 1] : join(import.meta.dirname, '..', 'server', 'db', 'demo');

interface DemoTrace {
  file: string;
  title: string;
  scenario: Scenario;
  mode: 'step' | 'pulse';
  layout: Layout;
  instrumentVf: number;
  seed: number;
  /** The demo run and end it is a trace of, when the cable family alone does not say. */
  run?: string;
  end?: 'A' | 'B';
}

const DEMOS: DemoTrace[] = [
  {
    file: 'coax-feeder-open.csv',
    title: 'Antenna feeder, 50 Ω coax, broken at the mast clamp',
    scenario: { name: 'coax feeder', cable: COAX_50, lengthM: 120, end: 'matched', features: [{ kind: 'open', atM: 62.4 }] },
    mode: 'step',
    layout: 'time-ns-mv',
    instrumentVf: 0.66,
    seed: 101,
  },
  {
    file: 'telecom-pair-wet-short.csv',
    title: 'Subscriber pair, water in a joint and a short further on',
    scenario: {
      name: 'telecom pair',
      cable: PAIR_100,
      lengthM: 180,
      end: 'open',
      features: [
        { kind: 'wet', atM: 71, lengthM: 12, zScale: 0.75, vfScale: 0.85 },
        { kind: 'short', atM: 143.5, rOhm: 2 },
      ],
    },
    mode: 'pulse',
    layout: 'distance-m-preamble',
    instrumentVf: 0.67,
    seed: 202,
  },
  {
    file: 'mv-cable-splice-fault.csv',
    title: '12 kV XLPE feeder, a splice and an insulation fault',
    scenario: {
      name: 'mv cable',
      cable: POWER_MV,
      lengthM: 900,
      end: 'open',
      features: [
        { kind: 'splice', atM: 350, lengthM: 0.6, zScale: 0.6 },
        { kind: 'shunt', atM: 612, rOhm: 12 },
      ],
    },
    mode: 'step',
    layout: 'time-s-v-comments',
    instrumentVf: 0.56,
    seed: 303,
    run: 'Feeder HN-3 to Ashby Lane',
    end: 'A',
  },
  {
    // The same feeder and fault seen from end B: 900 − 612 = 288 m, the splice at 900 − 350 = 550 m.
    file: 'mv-cable-splice-fault-from-b.csv',
    title: '12 kV XLPE feeder, the same insulation fault measured from the far end',
    scenario: {
      name: 'mv cable from end B',
      cable: POWER_MV,
      lengthM: 900,
      end: 'open',
      features: [
        { kind: 'shunt', atM: 288, rOhm: 12 },
        { kind: 'splice', atM: 550, lengthM: 0.6, zScale: 0.6 },
      ],
    },
    mode: 'step',
    layout: 'time-s-v-comments',
    instrumentVf: 0.56,
    seed: 304,
    run: 'Feeder HN-3 to Ashby Lane',
    end: 'B',
  },
];

/**
 * Traces of demo runs the seed leaves without any, for a new user to try an upload with: each names the run
 * and end it was taken on, and the cable is the library's type of that run (same velocity factor), so the
 * distance read back is the one the simulator put the fault at.
 */
const SAMPLES: DemoTrace[] = [
  {
    // Data-grade twisted pair, 100 Ω, VF 0.675 in the demo library; the run is 88 m with the duct pit at 40 m (1 m coiled).
    file: 'oakhollow-data-link-short.csv',
    title: 'Data link OH-D1 from end A: a short where the pair was crushed under a cabinet plinth',
    scenario: {
      name: 'data link',
      cable: variant(PAIR_100, 1, 0.675 / PAIR_100.vf, 'pair-100 data grade'),
      lengthM: 88,
      end: 'open',
      features: [{ kind: 'short', atM: 57.3, rOhm: 1 }],
    },
    mode: 'pulse',
    layout: 'time-ns-mv',
    instrumentVf: 0.675,
    seed: 401,
    run: 'Data link OH-D1',
    end: 'A',
  },
  {
    // Jelly-filled telephone pair, 100 Ω, VF 0.64 in the demo library; the run is 1450 m, pole 3 at 210 m (5 m coiled).
    file: 'brookfold-telemetry-open.csv',
    title: 'Telemetry pair BF-T1 from end A: a conductor broken where a pole was hit',
    scenario: {
      name: 'telemetry pair',
      cable: variant(PAIR_100, 1, 0.64 / PAIR_100.vf, 'pair-100 jelly filled'),
      lengthM: 1450,
      end: 'open',
      features: [{ kind: 'open', atM: 263.5 }],
    },
    mode: 'step',
    layout: 'time-s-v-comments',
    instrumentVf: 0.64,
    seed: 402,
    run: 'Telemetry pair BF-T1',
    end: 'A',
  },
];

function writeSet(out: string, traces: DemoTrace[], forTrying: boolean) {
  mkdirSync(out, { recursive: true });
  const manifest = traces.map((d) => {
    const acq = defaultAcquisition(d.scenario, d.mode, d.seed, 0.002, 12);
    const sim = simulateScenario(d.scenario, acq);
    writeFileSync(
      join(out, d.file),
      writeLayout({
        layout: d.layout,
        timeS: sim.timeS,
        volts: sim.volts,
        incidentV: sim.incidentV,
        instrumentVf: d.instrumentVf,
        cableName: d.scenario.cable.name,
        z0Ohm: d.scenario.cable.z0Ohm,
      }),
    );
    const faults = sim.expected.filter(
      (e) => !e.what.startsWith('cable end') && e.what !== 'splice' && e.what !== 'wet section end',
    );
    return {
      file: d.file,
      title: d.title,
      demoOnly: true,
      ...(forTrying ? { forTrying: true } : {}),
      ...(d.run ? { run: d.run, end: d.end } : {}),
      cable: d.scenario.cable.name,
      vf: d.scenario.cable.vf,
      z0Ohm: d.scenario.cable.z0Ohm,
      lengthM: d.scenario.lengthM,
      mode: d.mode,
      layout: d.layout,
      instrumentVf: d.instrumentVf,
      trueFaultDistanceM: faults.length > 0 ? faults[faults.length - 1].distanceM : null,
      features: sim.expected.map((e) => ({ distanceM: Math.round(e.distanceM * 100) / 100, type: e.type, what: e.what })),
    };
  });
  writeFileSync(join(out, 'manifest.json'), `${JSON.stringify(manifest, null, 2)}\n`);
  console.log(`wrote ${manifest.length} ${forTrying ? 'sample traces to try' : 'demo traces'} to ${out}`);
}

writeSet(join(OUT_ROOT, 'traces'), DEMOS, false);
writeSet(join(OUT_ROOT, 'samples'), SAMPLES, true);
