import { describe, expect, it } from 'vitest';
import { SPEED_OF_LIGHT_M_PER_S } from '../../../shared/cable/propagation';
import { analyzeCsv } from '../../../shared/trace';
import { attenuationFromLineConstants } from '../../../shared/trace/loss';
import { PAIR_04 } from '../../../scripts/sim/cables';
import { type CableModel, simulate } from '../../../scripts/sim/line-model';
import { writeLayout } from '../../../scripts/sim/layouts';
import { defaultAcquisition, type Scenario } from '../../../scripts/sim/scenario';

/**
 * A shunt resistor part-way along a long lossy pair, with more line past it. The fault meets the line's
 * own impedance on both sides, which grows at low frequency (series loss), so its echo is not the plain
 * edge of its reflection coefficient: it goes on growing as that impedance does, and a plain edge fitted
 * to it puts its arrival late. The trace comes from the frequency-domain simulator
 * (scripts/sim/line-model.ts: the exact input impedance of the network, Pozar §2.7 and §4.4); the check
 * value is where the resistor was put.
 */

function libraryLoss(cable: CableModel) {
  const v = cable.vf * SPEED_OF_LIGHT_M_PER_S;
  const lc = { rDcOhmPerM: cable.rdcOhmPerM, skinOhmPerMRootHz: cable.skinOhmPerMRootHz, lHPerM: cable.z0Ohm / v, cFPerM: 1 / (cable.z0Ohm * v), lossTangent: cable.tanDelta };
  return [1e5, 1e6, 1e7].map((f) => ({ frequencyHz: f, dbPer100m: attenuationFromLineConstants(lc, f) }));
}

/** A step into `atM` of cable, a shunt of `rOhm`, then cable to an open end at `lengthM`; seeded noise of 0.2 % of the step. */
function shuntTrace(cable: CableModel, atM: number, rOhm: number, lengthM: number): string {
  const scenario: Scenario = { name: 'shunt', cable, lengthM, end: 'open', features: [] };
  const acq = defaultAcquisition(scenario, 'step', 1, 0, 16);
  const dt = acq.sampleIntervalS;
  const t0 = acq.preTriggerSamples;
  const n = acq.samples;
  const clean = simulate(
    {
      elements: [
        { kind: 'line', lengthM: atM, cable },
        { kind: 'shunt', rOhm },
        { kind: 'line', lengthM: lengthM - atM, cable },
      ],
      termination: { kind: 'open' },
    },
    { samples: n, sampleIntervalS: dt, launchAtS: t0 * dt, riseTimeS: acq.riseTimeS, sourceV: 2, sourceOhm: cable.z0Ohm, excitation: { kind: 'step' } },
  );
  // Gaussian noise by Box–Muller from a linear congruential sequence (the C library's constants).
  let state = 12345;
  const uniform = () => (state = (state * 1103515245 + 12345) % 2147483648) / 2147483648;
  const volts = clean.map((v) => v + 0.002 * Math.sqrt(-2 * Math.log(uniform() + 1e-12)) * Math.cos(2 * Math.PI * uniform()));
  const timeS = new Float64Array(n).map((_, i) => (i - t0) * dt);
  return writeLayout({ layout: 'time-ns-mv', timeS, volts, incidentV: 1, instrumentVf: cable.vf, cableName: cable.name });
}

describe('a shunt fault on a lossy pair with line past it, with the cable’s loss known', () => {
  const cable = PAIR_04;
  const atM = 400;
  const rOhm = 150;
  const lengthM = 900;

  it('places the shunt within a third of the distance tolerance, as a drop', () => {
    const a = analyzeCsv(shuntTrace(cable, atM, rOhm, lengthM), {}, { vf: cable.vf, z0Ohm: cable.z0Ohm, loss: libraryLoss(cable) });
    const tolM = Math.max(0.5, 0.01 * atM);
    const near = a.events.reduce((b, e) => (Math.abs(e.distanceM - atM) < Math.abs(b.distanceM - atM) ? e : b));
    const seen = JSON.stringify(a.events.map((e) => [e.distanceM.toFixed(2), e.type]));
    // A plain edge fitted to this echo put it 3.8 m late (just inside the 4 m tolerance).
    expect(Math.abs(near.distanceM - atM), seen).toBeLessThan(tolM / 3);
    expect(near.type, seen).toBe('impedance-drop');
  });
});
