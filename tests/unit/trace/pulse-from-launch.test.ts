import { describe, expect, it } from 'vitest';
import { libraryLoss } from './support/lossy-line';
import { analyzeCsv } from '../../../shared/trace';
import { PAIR_04, PAIR_100 } from '../../../scripts/sim/cables';
import { writeLayout } from '../../../scripts/sim/layouts';
import { defaultAcquisition, type Scenario, simulateScenario } from '../../../scripts/sim/scenario';

/**
 * Pulse records that start at the launch (no pre-trigger, as distance exports that begin at 0 m
 * are written), on long lossy pairs from the frequency-domain simulator (scripts/sim). Loss
 * spreads each echo with a long tail, so the half-area point of its running sum comes later
 * the further it went; the echo must be fitted with the line's own response to a launch
 * rebuilt from its measured width and rise. The check values are the simulator's own: where
 * each feature was put.
 */

/** The cable's attenuation at a few frequencies, as the cable library would hold it. */

const ROUTES: Array<Omit<Scenario, 'name'>> = [
  { cable: PAIR_100, lengthM: 500, end: 'open', features: [{ kind: 'series', atM: 210, rOhm: 80 }] },
  { cable: PAIR_100, lengthM: 800, end: 'open', features: [] },
  { cable: PAIR_04, lengthM: 600, end: 'short', features: [] },
];

const tolerance = (d: number) => Math.max(0.5, 0.01 * d); // the product's requirement

describe('a pulse record that starts at its launch', () => {
  it('places far features within max(0.5 m, 1 %), not late', () => {
    let seed = 7400;
    const rows: Array<{ what: string; expectedM: number; gotM: number }> = [];
    for (const route of ROUTES) {
      const scenario: Scenario = { ...route, name: `${route.cable.name}-${route.lengthM}m` };
      const sim = simulateScenario(scenario, defaultAcquisition(scenario, 'pulse', seed++, 0.002, 12));
      // Keep the samples from the launch's half height (time zero) on.
      const first = sim.timeS.findIndex((t) => t >= -1e-15);
      const csv = writeLayout({
        layout: 'time-ns-mv',
        timeS: sim.timeS.subarray(first),
        volts: sim.volts.subarray(first),
        incidentV: sim.incidentV,
        instrumentVf: route.cable.vf,
        cableName: route.cable.name,
      });
      const a = analyzeCsv(csv, {}, { vf: route.cable.vf, z0Ohm: route.cable.z0Ohm, loss: libraryLoss(route.cable, [1e5, 1e6, 1e7, 1e8]) });
      expect(a.mode).toBe('pulse');
      expect(a.warnings.map((w) => w.code)).toContain('LAUNCH_BEFORE_RECORD');
      for (const e of sim.expected.filter((x) => !x.optional)) {
        const near = a.events.reduce((b, g) => (Math.abs(g.distanceM - e.distanceM) < Math.abs(b.distanceM - e.distanceM) ? g : b), a.events[0]);
        rows.push({ what: `${scenario.name} ${e.what}`, expectedM: e.distanceM, gotM: near?.distanceM ?? NaN });
      }
    }
    expect(rows.length).toBeGreaterThanOrEqual(4);
    for (const r of rows) expect(Math.abs(r.gotM - r.expectedM), r.what).toBeLessThanOrEqual(tolerance(r.expectedM));
  });
});
