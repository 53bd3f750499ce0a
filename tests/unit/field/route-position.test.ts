import { describe, expect, it } from 'vitest';
import {
  cableLengthAt,
  chainageAt,
  describeCrossings,
  describeRoute,
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
    expect(describeRoutePosition(p, metresText)).toBe('40.0 m past splice SP-1 toward pedestal P-7; dig on the ground 37.0–43.0 m past SP-1');
    expect(describeRoutePosition(p, 'm')).toBe('40.0 m past splice SP-1 toward pedestal P-7; dig on the ground 37.0–43.0 m past SP-1');
    // 40 m / 0.3048 = 131.23 ft; 37 m = 121.39 ft; 43 m = 141.08 ft.
    expect(describeRoutePosition(p, 'ft')).toBe('131.2 ft past splice SP-1 toward pedestal P-7; dig on the ground 121.4–141.1 ft past SP-1');
    expect(p.crossed).toEqual([]);
    expect(describeCrossings(p, 'm')).toBeNull();
  });

  it('places a point before the first marker from end A, with nothing taken off', () => {
    // 60 m of cable, no marker passed: 60 m along the route from end A toward MH-3.
    const p = routePosition(run, 'A', 60, { startM: 58.5, endM: 61.5 });
    expect(p.from).toMatchObject({ kind: 'end', label: 'A', name: 'Substation' });
    expect(p.toward.label).toBe('MH-3');
    expect(p.offsetM).toBeCloseTo(60, 9);
    expect(describeRoutePosition(p, metresText)).toBe('60.0 m past end A (Substation) toward manhole MH-3; dig on the ground 58.5–61.5 m past end A');
  });

  it('puts a point inside a coil at the marker itself', () => {
    // MH-3 is reached at 100 m of cable; its coil spans 100–104 m. 102 m is in the coil.
    const p = routePosition(run, 'A', 102, { startM: 101, endM: 103 });
    expect(p.inSlackAt).toBe('MH-3');
    expect(p.chainageM).toBe(100);
    expect(p.offsetM).toBe(0);
  });

  it('reads a trace from end B from end B: the last marker passed coming from B, toward A', () => {
    // 120 m from B on a 500 m cable = 380 m from A; coils passed from A: 4 + 6 + 3 = 13 m → 367 m of route.
    // Route length 500 − 13 = 487 m, so the point is 487 − 367 = 120 m of ground from B, before P-7
    // (487 − 300 = 187 m from B): 120 m past end B toward P-7.
    const p = routePosition(run, 'B', 120, { startM: 117, endM: 123 });
    expect(p.distanceFromAM).toBe(380);
    expect(p.chainageM).toBeCloseTo(367, 9);
    expect(p.measuredFrom).toBe('B');
    expect(p.from).toMatchObject({ kind: 'end', label: 'B', chainageM: 487 });
    expect(p.toward.label).toBe('P-7');
    expect(p.offsetM).toBeCloseTo(120, 9);
    // The window 117–123 m of cable from B has no coil in it: 117–123 m of ground past end B.
    expect(p.windowStartOffsetM).toBeCloseTo(117, 9);
    expect(p.windowEndOffsetM).toBeCloseTo(123, 9);
    expect(describeRoutePosition(p, 'm')).toBe('120.0 m past end B (Cabinet 12) toward pedestal P-7; dig on the ground 117.0–123.0 m past end B');
  });

  it('counts a coil passed on the way from end B', () => {
    // 250 m from B = 250 m from A → 250 − 10 = 240 m of route from A, 487 − 240 = 247 m from B.
    // Coming from B: P-7 is reached after 187 m of ground, its 3 m coil brings the cable to 190 m,
    // and the remaining 60 m of cable are 60 m of ground past P-7, toward SP-1.
    const p = routePosition(run, 'B', 250, { startM: 247, endM: 253 });
    expect(p.from.label).toBe('P-7');
    expect(p.toward.label).toBe('SP-1');
    expect(p.offsetM).toBeCloseTo(60, 9);
    // 247–253 m of cable from B → 57–63 m past P-7.
    expect(p.windowStartOffsetM).toBeCloseTo(57, 9);
    expect(p.windowEndOffsetM).toBeCloseTo(63, 9);
    expect(describeRoutePosition(p, 'm')).toBe('60.0 m past pedestal P-7 toward splice SP-1; dig on the ground 57.0–63.0 m past P-7');
  });

  it('says so when the window starts before the marker', () => {
    // SP-1 is reached at 200 + 4 = 204 m of cable and its coil runs to 210 m, so 211 m of cable is
    // 211 − 10 = 201 m of route, 1 m past SP-1. The window starts at 196 m of cable = 192 m of route
    // (only MH-3's 4 m passed): 8 m before SP-1; it ends at 214 m of cable = 204 m of route, 4 m past.
    const p = routePosition(run, 'A', 211, { startM: 196, endM: 214 });
    // 196 m of cable = 192 m of route, 8 m before SP-1.
    expect(p.windowStartOffsetM).toBeCloseTo(-8, 9);
    expect(describeRoutePosition(p, 'm')).toContain('dig on the ground from 8.00 m before SP-1 to 4.00 m past it');
    // SP-1 itself is named as the window's start, not as a marker crossed.
    expect(p.crossed).toEqual([]);
  });

  it('flags a distance beyond the far end, from either end', () => {
    const p = routePosition(run, 'A', 530, { startM: 525, endM: 535 });
    expect(p.beyondEnd).toBe(true);
    expect(describeRoutePosition(p, metresText)).toMatch(/^beyond the far end of the cable by 30\.0 m/);
    // From B the far end is A: 512 m of a 500 m cable is 12 m beyond it.
    const b = routePosition(run, 'B', 512, { startM: 508, endM: 516 });
    expect(b.beyondEnd).toBe(true);
    expect(describeRoute(b, 'm')).toBe('beyond the far end of the cable by 12.0 m: check the installed length and the velocity factor');
  });

  it('says the fault may be beyond the far end when only its window is past it, and is beyond only when the whole window is', () => {
    // 503 m of a 500 m cable from A, window 496–510 m: the point is 3 m past end B, the window from 4 m short of it to 10 m past.
    const point = routePosition(run, 'A', 503, { startM: 496, endM: 510 });
    expect(point.windowPastFarEndM).toEqual([-4, 10]);
    expect(describeRoute(point, 'm')).toBe(
      'may be beyond the far end of the cable: the reading is 3.00 m past it, its window from 4.00 m short of it to 10.0 m past it; ' +
        'check the installed length and the velocity factor',
    );
    // 497 m from A is on the cable: 497 − 13 m of coils = 484 m of route, 184 m past P-7 (at 300 m). Its window, 490–504 m of
    // cable, is 477 m of route (177 m past P-7) to the end of the route (487 m, 187 m past P-7), and runs 4 m of cable past end B.
    const window = routePosition(run, 'A', 497, { startM: 490, endM: 504 });
    expect(window.beyondEnd).toBe(false);
    expect(describeRoutePosition(window, 'm')).toBe('184.0 m past pedestal P-7 toward end B (Cabinet 12); dig on the ground 177.0–187.0 m past P-7');
    expect(describeCrossings(window, 'm')).toBe(
      'The window runs 4.00 m of cable past the far end, end B (Cabinet 12): the fault may be beyond the far end of the cable; ' +
        'check the installed length and the velocity factor.',
    );
    // From B the far end is A: 502 m of a 500 m cable with a window of 495–509 m.
    const fromB = routePosition(run, 'B', 502, { startM: 495, endM: 509 });
    expect(describeRoutePosition(fromB, 'm')).toMatch(/^may be beyond the far end of the cable: the reading is 2\.00 m past it, its window from 5\.00 m short of it to 9\.00 m past it/);
    // A window wholly on the cable says nothing of the far end.
    expect(describeCrossings(routePosition(run, 'A', 250, { startM: 247, endM: 253 }), 'm')).toBeNull();
  });

  it('names the marker a wide window crosses, with the marker it is measured from', () => {
    // 240 m of cable from A is 230 m of route (MH-3 and SP-1 coils, 10 m, passed): 30 m past SP-1.
    // Window 215–330 m of cable: 215 − 10 = 205 m of route; 330 m is past P-7's coil
    // (reached at 310 m of cable, coiled to 313 m), so 330 − 13 = 317 m of route.
    // On the ground past SP-1 (at 200 m): 5–117 m, and P-7 (at 300 m) lies 100 m past SP-1, inside it.
    const p = routePosition(run, 'A', 240, { startM: 215, endM: 330 });
    expect(p.from.label).toBe('SP-1');
    expect(p.windowStartOffsetM).toBeCloseTo(5, 9);
    expect(p.windowEndOffsetM).toBeCloseTo(117, 9);
    expect(p.crossed?.map((c) => c.place.label)).toEqual(['P-7']);
    expect(p.crossed?.[0].offsetM).toBeCloseTo(100, 9);
    expect(describeRoute(p, 'm')).toBe(
      '30.0 m past splice SP-1 toward pedestal P-7; dig on the ground 5.0–117.0 m past SP-1. ' +
        'The dig window crosses pedestal P-7 (100.0 m past SP-1): the fault may be on either side of it.',
    );
  });

  it('names a crossing in the direction of a reading from end B', () => {
    // 180 m from B = 320 m from A, past every coil (13 m): 307 m of route from A, 487 − 307 = 180 m from B.
    // P-7 is 187 m from B, so the point is 180 m past end B toward P-7.
    // Window 150–215 m of cable from B: 150 m of ground (no coil before P-7); 215 m is past P-7's coil
    // (187 + 3 = 190 m of cable), so 215 − 3 = 212 m of ground. P-7 at 187 m lies inside 150–212 m.
    const p = routePosition(run, 'B', 180, { startM: 150, endM: 215 });
    expect(p.from).toMatchObject({ kind: 'end', label: 'B' });
    expect(p.offsetM).toBeCloseTo(180, 9);
    expect(p.windowStartOffsetM).toBeCloseTo(150, 9);
    expect(p.windowEndOffsetM).toBeCloseTo(212, 9);
    expect(p.crossed?.map((c) => [c.place.label, Math.round(c.offsetM * 1000) / 1000])).toEqual([['P-7', 187]]);
    // In feet: 180 m = 590.6 ft, 150 m = 492.1 ft, 212 m = 695.5 ft, 187 m = 613.5 ft.
    expect(describeRoute(p, 'ft')).toBe(
      '590.6 ft past end B (Cabinet 12) toward pedestal P-7; dig on the ground 492.1–695.5 ft past end B. ' +
        'The dig window crosses pedestal P-7 (613.5 ft past end B): the fault may be on either side of it.',
    );
  });

  it('still describes a position stored before the direction was kept', () => {
    const stored = routePosition(run, 'A', 250, { startM: 247, endM: 253 });
    delete stored.measuredFrom;
    delete stored.crossed;
    delete stored.beyondByM;
    expect(describeRoute(stored, 'm')).toBe('40.0 m past splice SP-1 toward pedestal P-7; dig on the ground 37.0–43.0 m past SP-1');
    // A position stored before the window's reach past the far end was kept reads as it did.
    const beyond = routePosition(run, 'A', 503, { startM: 496, endM: 510 });
    delete beyond.windowPastFarEndM;
    expect(describeRoutePosition(beyond, 'm')).toBe('beyond the far end of the cable by 3.00 m: check the installed length and the velocity factor');
  });

  it('inverts: cable length at a chainage', () => {
    // 250 m of route is past MH-3 and SP-1: 250 + 4 + 6 = 260 m of cable.
    expect(cableLengthAt(run.markers, 250)).toBe(260);
    expect(chainageAt(run.markers, 260).chainageM).toBe(250);
    expect(routeLengthM(run)).toBe(487);
  });
});

describe('an aerial span', () => {
  it('is searched along the span between two poles, not dug; a buried stretch is still dug', () => {
    // Poles at 100 m and 150 m, a handhole at 250 m, no slack: 120 m of cable from A is 20 m past P-1.
    const overhead: RunLike = {
      installedLengthM: 300,
      endALabel: 'Yard',
      endBLabel: 'Cabinet',
      markers: [
        { label: 'P-1', kind: 'pole', chainageM: 100, slackM: 0 },
        { label: 'P-2', kind: 'pole', chainageM: 150, slackM: 0 },
        { label: 'HH-1', kind: 'handhole', chainageM: 250, slackM: 0 },
      ],
    };
    const span = routePosition(overhead, 'A', 120, { startM: 118, endM: 122 });
    expect(describeRoutePosition(span, 'm')).toBe('20.0 m past pole P-1 toward pole P-2; search the span 18.0–22.0 m past P-1');
    // Between the second pole and a handhole the cable goes underground somewhere: dug as before.
    const down = routePosition(overhead, 'A', 200, { startM: 198, endM: 202 });
    expect(describeRoutePosition(down, 'm')).toBe('50.0 m past pole P-2 toward handhole HH-1; dig on the ground 48.0–52.0 m past P-2');
  });
});
