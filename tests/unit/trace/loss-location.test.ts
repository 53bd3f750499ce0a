import { describe, expect, it } from 'vitest';
import { libraryLoss } from './support/lossy-line';
import { analyzeCsv } from '../../../shared/trace';
import { PAIR_04, PAIR_100 } from '../../../scripts/sim/cables';
import { writeLayout } from '../../../scripts/sim/layouts';
import { defaultAcquisition, type Scenario, simulateScenario } from '../../../scripts/sim/scenario';

/**
 * End to end on long, lossy telephone pairs from the frequency-domain simulator
 * (scripts/sim): skin effect, DC resistance and dielectric loss, noise and ADC.
 * The check values are the simulator's own: where each feature was put.
 */

/** The cable's attenuation at a few frequencies, as the cable library would hold it. */

const ROUTES: Array<Omit<Scenario, 'name'>> = [
  { cable: PAIR_100, lengthM: 300, end: 'short', features: [] },
  { cable: PAIR_100, lengthM: 500, end: 'open', features: [{ kind: 'series', atM: 210, rOhm: 80 }] },
  { cable: PAIR_100, lengthM: 800, end: 'open', features: [] },
  { cable: PAIR_04, lengthM: 600, end: 'open', features: [] },
];

interface Located {
  route: string;
  expectedM: number;
  gotM: number;
  held: boolean;
}

function locate(withLibraryLoss: boolean): Located[] {
  const out: Located[] = [];
  let seed = 7000;
  for (const route of ROUTES) {
    for (const mode of ['step', 'pulse'] as const) {
      const scenario: Scenario = { ...route, name: `${route.cable.name}-${route.lengthM}m` };
      const acq = defaultAcquisition(scenario, mode, seed++, 0.002, 12);
      const sim = simulateScenario(scenario, acq);
      const csv = writeLayout({ layout: 'time-ns-mv', timeS: sim.timeS, volts: sim.volts, incidentV: sim.incidentV, instrumentVf: route.cable.vf, cableName: route.cable.name });
      const a = analyzeCsv(csv, {}, { vf: route.cable.vf, z0Ohm: route.cable.z0Ohm, ...(withLibraryLoss ? { loss: libraryLoss(route.cable, [1e5, 1e6, 1e7, 1e8]) } : {}) });
      for (const e of sim.expected.filter((x) => !x.optional)) {
        const near = a.events.reduce((best, g) => (Math.abs(g.distanceM - e.distanceM) < Math.abs(best.distanceM - e.distanceM) ? g : best), a.events[0]);
        out.push({
          route: `${scenario.name} ${mode} ${e.what}`,
          expectedM: e.distanceM,
          gotM: near?.distanceM ?? NaN,
          held: near !== undefined && near.windowStartM <= e.distanceM && e.distanceM <= near.windowEndM,
        });
      }
    }
  }
  return out;
}

const tolerance = (d: number) => Math.max(0.5, 0.01 * d); // the product's requirement
const relError = (r: Located) => (r.gotM - r.expectedM) / r.expectedM;

describe('location on long lossy pairs', () => {
  it('places every feature within max(0.5 m, 1 %) and does not read late, with the library’s loss', () => {
    const rows = locate(true);
    expect(rows.length).toBeGreaterThanOrEqual(10);
    for (const r of rows) expect(Math.abs(r.gotM - r.expectedM), r.route).toBeLessThanOrEqual(tolerance(r.expectedM));
    // Not biased late: the mean signed error is under a tenth of the 1 % tolerance on the late side
    // (and under half of it on the early side), and some events read early.
    const mean = rows.reduce((s, r) => s + relError(r), 0) / rows.length;
    expect(mean).toBeLessThan(0.001);
    expect(mean).toBeGreaterThan(-0.005);
    expect(rows.filter((r) => r.gotM < r.expectedM).length).toBeGreaterThanOrEqual(2);
    // Every window holds its feature (the VF here is exact, so the default ±2 % is margin).
    expect(rows.filter((r) => !r.held).map((r) => r.route)).toEqual([]);
  });

  it('keeps every window around its feature when the loss is estimated from the trace', () => {
    const rows = locate(false);
    expect(rows.filter((r) => !r.held).map((r) => r.route)).toEqual([]);
  });
});
