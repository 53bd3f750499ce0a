import { describe, expect, it } from 'vitest';
import type { Sim2Case } from '../../../scripts/sim2/cases';
import { scoreCase } from '../../../scripts/sim2/score';

// The scorer's own rules (stated in scripts/sim2/score.ts): distance within max(0.5 m, 1 %),
// ρ within max(0.1, 25 % of |ρ|) of the range between local and seen ρ.
const base: Omit<Sim2Case, 'expected' | 'echoes'> = {
  id: 'case',
  csv: '',
  layout: 'time-ns-mv',
  vf: 0.66,
  z0Ohm: 50,
  loss: [],
  cableKind: 'coax-50',
  cableName: 'coax',
  lengthM: 300,
  mode: 'step',
  pulseWidthNs: null,
  riseTimeNs: 1,
  snrDb: 40,
  preTriggerPct: 10,
  bits: 12,
  sampleIntervalNs: 1,
  samples: 1000,
  recordOverRoundTrip: 2,
  sourceOhm: 50,
  clipped: false,
  instrumentVf: 0.66,
  features: [],
};

const c: Sim2Case = {
  ...base,
  expected: [
    {
      distanceM: 120,
      type: 'impedance-rise',
      what: 'series',
      required: true,
      rho: 0.2,
      rhoSeen: 0.18,
      rhoCheck: true,
      physicalM: 120,
    },
    { distanceM: 300, type: 'open', what: 'end', required: true, rho: 1, rhoSeen: 0.64, rhoCheck: true, physicalM: 300 },
    {
      distanceM: 30,
      type: 'impedance-drop',
      what: 'weak',
      required: false,
      optional: true,
      rho: -0.01,
      rhoSeen: -0.01,
      rhoCheck: true,
      physicalM: 30,
    },
  ],
  echoes: [{ distanceM: 240, rho: 0.04 }],
};

const ev = (distanceM: number, type: string, rho: number, flagged = false) => ({
  distanceM,
  type,
  reflectionCoefficient: rho,
  windowStartM: distanceM - 3,
  windowEndM: distanceM + 3,
  likelyMultipleOf: flagged ? 0 : null,
});

describe('second-simulator scorer', () => {
  it('passes a trace read within tolerance, with the multiple flagged', () => {
    const s = scoreCase(c, [ev(121.1, 'impedance-rise', 0.17), ev(240.5, 'impedance-rise', 0.05, true), ev(302.9, 'open', 0.62)]);
    expect(s.problems).toEqual([]);
    expect(s.passed).toBe(true);
    expect([s.required, s.found, s.typeRight, s.rhoRight, s.windowHeld, s.falseEvents]).toEqual([2, 2, 2, 2, 2, 0]);
  });

  it('misses an event just outside max(0.5 m, 1 %) and counts the report as false', () => {
    const s = scoreCase(c, [ev(121.3, 'impedance-rise', 0.17), ev(302.9, 'open', 0.62)]);
    expect(s.found).toBe(1);
    expect(s.falseEvents).toBe(1);
    expect(s.passed).toBe(false);
  });

  it('checks type, ρ against the local-to-seen range, the window, and unflagged multiples', () => {
    const far = { ...ev(300.4, 'impedance-rise', 0.35), windowStartM: 300.5 };
    const s = scoreCase(c, [ev(120, 'impedance-rise', 0.31), ev(240, 'impedance-rise', 0.05), far]);
    // 0.31 > 0.2 + 0.1; 0.35 < 0.64 − 0.25; window starts past 300 m; the multiple at 240 m is unflagged.
    expect(s.rhoRight).toBe(0);
    expect(s.typeRight).toBe(1);
    expect(s.windowHeld).toBe(1);
    expect(s.echoesUnflagged).toBe(1);
    expect(s.falseEvents).toBe(1);
  });

  it('neither requires nor counts as false a report of an optional event', () => {
    const s = scoreCase(c, [ev(30.2, 'impedance-drop', -0.012), ev(120, 'impedance-rise', 0.2), ev(300, 'open', 0.9)]);
    expect(s.passed).toBe(true);
  });
});
