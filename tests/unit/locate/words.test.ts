import { describe, expect, it } from 'vitest';
import { routePosition } from '../../../shared/field/route-position';
import { bestLocationRows, setAsideFigureText, setAsideText, weightText } from '../../../shared/locate/words';
import type { BestLocationView, LocationMethodView } from '../../../shared/schemas/measurements';

const method = (id: string, label: string, weight: number | null): LocationMethodView => ({
  id,
  method: 'murray-loop',
  label,
  fromEnd: 'A',
  distanceFromEndM: 120,
  distanceFromAM: 120,
  standardUncertaintyM: 1.2,
  windowStartM: 117.648,
  windowEndM: 122.352,
  used: weight !== null,
  weight,
  normalisedResidual: 0,
  findingId: null,
  traceId: null,
  measurementId: null,
  note: null,
});

/** 200 m run, MH-1 at chainage 40 m (2 m coiled), MH-2 at 80 m (3 m), P-7 at 120 m. */
const run = {
  installedLengthM: 200,
  endALabel: 'Cabinet C-1',
  endBLabel: 'Pole 14',
  markers: [
    { label: 'MH-1', kind: 'manhole' as const, chainageM: 40, slackM: 2 },
    { label: 'MH-2', kind: 'manhole' as const, chainageM: 80, slackM: 3 },
    { label: 'P-7', kind: 'pedestal' as const, chainageM: 120, slackM: 0 },
  ],
};

const best: BestLocationView = {
  distanceFromAM: 120,
  standardUncertaintyM: 1.2,
  windowStartM: 117.648,
  windowEndM: 122.352,
  coverageFactor: 1.96,
  consistent: true,
  verdict: 'The 2 readings agree (χ² = 0.02 on 1 degree of freedom, 95 % limit 3.84).',
  checks: [],
  test: { chiSquare: 0.02, degreesOfFreedom: 1, limit95: 3.84, birgeRatio: 0.14 },
  methods: [method('a', 'TDR from both ends (findings 1 and 2)', 0.65), method('b', 'Murray loop from end A (reading 1)', 0.35), method('c', 'TDR from end A (finding 1)', null)],
  excluded: [],
  routePosition: routePosition(run, 'A', 120, { startM: 117.648, endM: 122.352 }),
  routePositionText: null,
  ground: null,
  groundNote: null,
  assumptions: [],
};

describe('the best location in words', () => {
  it('writes the rows a crew reads in feet, through the one length formatter', () => {
    // 120 m = 393.70 ft, 1.2 m = 3.937 ft, 117.648–122.352 m = 385.98–401.42 ft (0.3048 m per international foot).
    // 120 m of cable passes the 2 m and 3 m coils: chainage 115 m, 35 m = 114.8 ft past MH-2 (hand-worked).
    expect(bestLocationRows(best, run, 'ft')).toEqual([
      ['Best location', '393.7 ft of cable from end A (Cabinet C-1), ± 3.94 ft (standard uncertainty)'],
      ['Dig window (95 %)', '386.0–401.4 ft of cable from end A'],
      ['Where to dig', expect.stringMatching(/^114\.8 ft past manhole MH-2 toward pedestal P-7; dig on the ground/)],
      ['Based on', 'TDR from both ends (findings 1 and 2), 65 %; Murray loop from end A (reading 1), 35 %'],
      // The verdict as the screens say it: the agreement test's figures stay on the page, under the readings.
      ['Readings', 'The 2 readings agree.'],
    ]);
  });

  it('says a set-aside reading in the same plain words as the page, without χ² or σ', () => {
    const rows = bestLocationRows(
      {
        ...best,
        consistent: false,
        verdict:
          'The readings disagree (χ² = 50.40 on 2 degrees of freedom, 95 % limit 5.99). Murray loop from end A (reading 1) stands apart, 80.0 m further from end A than the others (7.1 σ); the other 2 agree and give the location without it.',
        outlier: { methodId: 'b', label: 'Murray loop from end A (reading 1)', offsetM: 80, sigmas: 7.1 },
        checks: ['that the looped conductor is sound and the far-end strap is tight'],
      },
      run,
      'm',
    );
    expect(rows).toContainEqual([
      'Readings disagree',
      'The readings disagree. Murray loop from end A (reading 1) stands apart, 80.0 m further from end A than the others; the other 2 agree and give the location without it.',
    ]);
    expect(rows).toContainEqual([
      'Set aside',
      'Murray loop from end A (reading 1) puts the fault 80.0 m further from end A than the other readings do. That is more than their uncertainties can explain, so it was left out and the best location comes from the others. Check that reading (end, cable, velocity factor) before relying on it.',
    ]);
    expect(rows.map(([, v]) => v).join(' ')).not.toMatch(/χ²|σ/);
  });

  it('says there is no location, names the one set aside and what to check, lengths in the reader’s unit', () => {
    const rows = bestLocationRows(
      {
        ...best,
        distanceFromAM: null,
        standardUncertaintyM: null,
        windowStartM: null,
        windowEndM: null,
        consistent: false,
        verdict: 'The readings disagree.',
        checks: ['the TDR readings from the two ends add up to 914.0 m on a 900.0 m run'],
      },
      run,
      'ft',
    );
    expect(rows[0]).toEqual(['Best location', 'none: the readings disagree and none can be set aside']);
    // 914 m = 2998.7 ft → 2999 ft; 900 m = 2952.8 ft → 2953 ft (four figures carry no decimals).
    expect(rows).toContainEqual(['What to check', 'the TDR readings from the two ends add up to 2999 ft on a 2953 ft run']);
  });

  it('says why a reading was set aside without σ, which is left to the figure for experts', () => {
    const outlier = { label: 'TDR from end B (finding 4)', offsetM: -31.25, sigmas: 3.46 };
    expect(setAsideText(outlier, 'm')).toBe(
      'TDR from end B (finding 4) puts the fault 31.3 m nearer to end A than the other readings do. That is more than their uncertainties can explain, so it was left out and the best location comes from the others. Check that reading (end, cable, velocity factor) before relying on it.',
    );
    expect(setAsideText(outlier, 'm')).not.toMatch(/σ|sigma/);
    expect(setAsideFigureText(outlier)).toBe('3.5 σ: the gap is 3.5 times its standard uncertainty (σ); a reading more than 1.96 σ from the others is out of line at the 95 % level.');
  });

  it('writes weights in whole per cent, a small negative one with a true minus sign', () => {
    expect(weightText(0.655)).toBe('66 %');
    expect(weightText(0.995)).toBe('100 %');
    expect(weightText(-0.004)).toBe('0 %');
    expect(weightText(-0.012)).toBe('−1 %');
  });
});
