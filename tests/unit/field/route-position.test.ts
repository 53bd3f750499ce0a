import { describe, expect, it } from 'vitest';
import {
  cableLengthAt,
  chainageAt,
  describeRoutePosition,
  metresText,
  routeLengthM,
  routePosition,
  type RunLike,
} from '../../../shared/field/route-position';

// A 500 m cable laid along a 487 m route: 4 m coiled at MH-3, 6 m at SP-1, 3 m at P-7.
const run: RunLike = {
  installedLengthM: 500,
  endALabel: 'Substation',
  endBLabel: 'Cabinet 12',
  markers: [
    { label: 'P-7', kind: 'pedestal', chainageM: 300, slackM: 3 },
    { label: 'MH-3', kind: 'manhole', chainageM: 100, slackM: 4 },
    { label: 'SP-1', kind: 'splice', chainageM: 200, slackM: 6 },
  ],
};

describe('route position with slack (hand-worked)', () => {
  it('takes the coils passed off the electrical distance', () => {
    // 250 m of cable from A: past MH-3 (coil 4 m) and SP-1 (coil 6 m) → 250 − 10 = 240 m along the route,
    // 40 m past SP-1 toward P-7.
    const p = routePosition(run, 'A', 250, { startM: 247, endM: 253 });
    expect(p.chainageM).toBeCloseTo(240, 9);
    expect(p.from.label).toBe('SP-1');
    expect(p.toward.label).toBe('P-7');
    expect(p.offsetM).toBeCloseTo(40, 9);
    expect(p.slackDeductedM).toBeCloseTo(10, 9);
    // Window 247–253 m of cable → 237–243 m of route → 37–43 m past SP-1.
    expect(p.windowStartOffsetM).toBeCloseTo(37, 9);
    expect(p.windowEndOffsetM).toBeCloseTo(43, 9);
    expect(describeRoutePosition(p, metresText)).toBe('40.0 m past splice SP-1 toward pedestal P-7, dig window 37.0–43.0 m');
  });

  it('places a point before the first marker from end A, with nothing taken off', () => {
    // 60 m of cable, no marker passed: 60 m along the route from end A toward MH-3.
    const p = routePosition(run, 'A', 60, { startM: 58.5, endM: 61.5 });
    expect(p.from).toMatchObject({ kind: 'end', label: 'A', name: 'Substation' });
    expect(p.toward.label).toBe('MH-3');
    expect(p.offsetM).toBeCloseTo(60, 9);
    expect(describeRoutePosition(p, metresText)).toBe('60.0 m past end A (Substation) toward manhole MH-3, dig window 58.5–61.5 m');
  });

  it('puts a point inside a coil at the marker itself', () => {
    // MH-3 is reached at 100 m of cable; its coil spans 100–104 m. 102 m is in the coil.
    const p = routePosition(run, 'A', 102, { startM: 101, endM: 103 });
    expect(p.inSlackAt).toBe('MH-3');
    expect(p.chainageM).toBe(100);
    expect(p.offsetM).toBe(0);
  });

  it('measures from end B by turning the distance round on the installed length', () => {
    // 120 m from B on a 500 m cable = 380 m from A; coils passed from A: 4 + 6 + 3 = 13 m → 367 m of route,
    // 67 m past P-7 toward end B. Route length 500 − 13 = 487 m.
    const p = routePosition(run, 'B', 120, { startM: 117, endM: 123 });
    expect(p.distanceFromAM).toBe(380);
    expect(p.chainageM).toBeCloseTo(367, 9);
    expect(p.from.label).toBe('P-7');
    expect(p.toward).toMatchObject({ kind: 'end', label: 'B', chainageM: 487 });
    // The window turns round too: 117–123 m from B = 377–383 m from A → 364–370 m of route → 64–70 m past P-7.
    expect(p.windowStartOffsetM).toBeCloseTo(64, 9);
    expect(p.windowEndOffsetM).toBeCloseTo(70, 9);
  });

  it('says so when the window starts before the marker', () => {
    // SP-1 is reached at 200 + 4 = 204 m of cable and its coil runs to 210 m, so 211 m of cable is
    // 211 − 10 = 201 m of route, 1 m past SP-1. The window starts at 196 m of cable = 192 m of route
    // (only MH-3's 4 m passed): 8 m before SP-1; it ends at 214 m of cable = 204 m of route, 4 m past.
    const p = routePosition(run, 'A', 211, { startM: 196, endM: 214 });
    // 196 m of cable = 192 m of route, 8 m before SP-1.
    expect(p.windowStartOffsetM).toBeCloseTo(-8, 9);
    expect(describeRoutePosition(p, metresText)).toContain('dig window from 8.0 m before to 4.0 m past it');
  });

  it('flags a distance beyond the far end', () => {
    const p = routePosition(run, 'A', 530, { startM: 525, endM: 535 });
    expect(p.beyondEnd).toBe(true);
    expect(describeRoutePosition(p, metresText)).toMatch(/^beyond the far end of the cable by 30\.0 m/);
  });

  it('inverts: cable length at a chainage', () => {
    // 250 m of route is past MH-3 and SP-1: 250 + 4 + 6 = 260 m of cable.
    expect(cableLengthAt(run.markers, 250)).toBe(260);
    expect(chainageAt(run.markers, 260).chainageM).toBe(250);
    expect(routeLengthM(run)).toBe(487);
  });
});
