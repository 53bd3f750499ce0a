import { describe, expect, it } from 'vitest';
import { libraryLoss, lossyLineTrace } from './support/lossy-line';
import { analyzeCsv } from '../../../shared/trace';
import { PAIR_04 } from '../../../scripts/sim/cables';
import { type CableModel } from '../../../scripts/sim/line-model';

/**
 * A shunt resistor part-way along a long lossy pair, with more line past it. The fault meets the line's
 * own impedance on both sides, which grows at low frequency (series loss), so its echo is not the plain
 * edge of its reflection coefficient: it goes on growing as that impedance does, and a plain edge fitted
 * to it puts its arrival late. The trace comes from the frequency-domain simulator
 * (scripts/sim/line-model.ts: the exact input impedance of the network, Pozar §2.7 and §4.4); the check
 * value is where the resistor was put.
 */


/** A step into `atM` of cable, a shunt of `rOhm`, then cable to an open end at `lengthM`; seeded noise of 0.2 % of the step. */
const shuntTrace = (cable: CableModel, atM: number, rOhm: number, lengthM: number) =>
  lossyLineTrace(
    cable,
    lengthM,
    {
      elements: [
        { kind: 'line', lengthM: atM, cable },
        { kind: 'shunt', rOhm },
        { kind: 'line', lengthM: lengthM - atM, cable },
      ],
      termination: { kind: 'open' },
    },
    { noiseV: 0.002 },
  );

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
