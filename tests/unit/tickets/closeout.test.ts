import { describe, expect, it } from 'vitest';
import { closeoutCalibrationNote, CloseoutInputError, compareLocatedFound, foundPlace, impliedVf } from '../../../shared/tickets/closeout';
import { formatLength, lengthsInText } from '../../../shared/units/format-length';
import { allowedMoves, findMove, mayCloseOut } from '../../../shared/tickets/status';

// A 500 m run: MH-1 at 100 m of route with 5 m coiled, MH-2 at 250 m with 10 m coiled (route 485 m).
const run = {
  installedLengthM: 500,
  markers: [
    { id: 1, label: 'MH-1', kind: 'manhole' as const, chainageM: 100, slackM: 5 },
    { id: 2, label: 'MH-2', kind: 'manhole' as const, chainageM: 250, slackM: 10 },
  ],
};

describe('implied velocity factor', () => {
  it('is 2·d/(c·t)', () => {
    // Hand-worked: c = 299 792 458 m/s (SI definition); t = 2000 ns → c·t = 599.584916 m;
    // d = 200 m → VF = 400 / 599.584916 = 0.667128.
    expect(impliedVf(200, 2000)).toBeCloseTo(0.667128, 6);
  });
});

describe('located against found', () => {
  it('turns a marker and offset into cable length through the slack and compares', () => {
    // Hand-worked: the reading is t = 2400 ns from end A, located with VF 0.66:
    //   d_located = 0.66 · 299 792 458 · 2.4e-6 / 2 = 237.4356 m of cable.
    // The crew found it 3 m past MH-2: chainage 253 m; both coils (5 + 10 m) lie before it,
    //   so d_found = 253 + 15 = 268 m of cable from A.
    //   error = 237.4356 − 268 = −30.5644 m (located short);
    //   VF_implied = 2 · 268 / (299 792 458 · 2.4e-6) = 536 / 719.5019 = 0.744960.
    const r = compareLocatedFound(run, { measuredFrom: 'A', distanceM: 237.4356, roundTripNs: 2400 }, { method: 'marker', markerId: 2, offsetM: 3 });
    expect(r.foundDistanceM).toBeCloseTo(268, 9);
    expect(r.foundFromAM).toBeCloseTo(268, 9);
    expect(r.foundChainageM).toBeCloseTo(253, 9);
    expect(r.errorM).toBeCloseTo(-30.5644, 4);
    expect(r.errorFraction).toBeCloseTo(30.5644 / 268, 6);
    expect(r.impliedVf).toBeCloseTo(0.74496, 5);
  });

  it('measures the found distance from the end the reading was taken at', () => {
    // Hand-worked: a reading from end B; the crew says 268 m of cable from A, i.e. 500 − 268 = 232 m from B.
    const r = compareLocatedFound(run, { measuredFrom: 'B', distanceM: 230, roundTripNs: 2300 }, { method: 'distance', fromEnd: 'A', distanceM: 268 });
    expect(r.foundDistanceM).toBeCloseTo(232, 9);
    expect(r.foundFromAM).toBeCloseTo(268, 9);
    expect(r.errorM).toBeCloseTo(-2, 9);
    // 2 · 232 / (299 792 458 · 2.3e-6) = 464 / 689.5227 = 0.672929 (hand-worked).
    expect(r.impliedVf).toBeCloseTo(0.672929, 5);
  });

  it('places a point at a marker before its coil', () => {
    // Offset 0 at MH-1: 100 m of route and no coil passed yet → 100 m of cable from A.
    expect(foundPlace(run, 'A', { method: 'marker', markerId: 1, offsetM: 0 }).foundFromAM).toBeCloseTo(100, 9);
  });

  it('refuses positions off the cable, naming the field', () => {
    const off = (f: Parameters<typeof foundPlace>[2]) => {
      try {
        foundPlace(run, 'A', f);
      } catch (e) {
        return (e as CloseoutInputError).field;
      }
      return null;
    };
    expect(off({ method: 'distance', fromEnd: 'A', distanceM: 501 })).toBe('found.distanceM');
    expect(off({ method: 'marker', markerId: 9, offsetM: 1 })).toBe('found.markerId');
    // MH-2 at 250 m + 236 m = 486 m, past the 485 m route.
    expect(off({ method: 'marker', markerId: 2, offsetM: 236 })).toBe('found.offsetM');
    expect(off({ method: 'marker', markerId: 2, offsetM: 235 })).toBeNull();
  });
});

describe('status rules', () => {
  it('never reaches signed-off except from fixed, nor fixed by a plain move', () => {
    for (const from of ['raised', 'assigned', 'under-way'] as const) expect(findMove(from, 'signed-off')).toBeUndefined();
    expect(findMove('fixed', 'signed-off')?.by).toEqual(['supervisor']);
    for (const from of ['raised', 'assigned', 'under-way'] as const) expect(findMove(from, 'fixed')).toBeUndefined();
  });

  it('lets the assignee start and close out, and only a supervisor sign off or withdraw', () => {
    const assignee = { isAssignee: true, isSupervisor: false };
    const supervisor = { isAssignee: false, isSupervisor: true };
    expect(allowedMoves('assigned', assignee).map((m) => m.to)).toEqual(['under-way']);
    expect(allowedMoves('fixed', assignee)).toEqual([]);
    expect(allowedMoves('fixed', supervisor).map((m) => m.to)).toEqual(['signed-off', 'under-way']);
    expect(mayCloseOut('under-way', assignee)).toBe(true);
    expect(mayCloseOut('raised', assignee)).toBe(false);
    expect(mayCloseOut('under-way', { isAssignee: false, isSupervisor: false })).toBe(false);
  });

  it('leaves starting, pausing and the close-out to the assignee: a supervisor viewing the crew’s ticket may only withdraw it', () => {
    const supervisor = { isAssignee: false, isSupervisor: true };
    expect(allowedMoves('assigned', supervisor).map((m) => m.label)).toEqual(['Withdraw']);
    expect(allowedMoves('under-way', supervisor).map((m) => m.label)).toEqual(['Withdraw']);
    expect(mayCloseOut('assigned', supervisor)).toBe(false);
    expect(mayCloseOut('under-way', supervisor)).toBe(false);
    expect(allowedMoves('under-way', { isAssignee: true, isSupervisor: false }).map((m) => m.label)).toEqual(['Pause work']);
  });
});

describe('the note a close-out files with its calibration', () => {
  it('reads, in each unit, the same located and found lengths as the ticket shows', () => {
    // Ticket 4 of a demo run: located 45.2477 m, found 45.0 m from end B. To the centimetre the note read "45.3 m".
    const located = 45.2476764264338;
    const note = closeoutCalibrationNote(4, 6, located, 45, 'B');
    expect(note).toBe('Repair close-out of ticket 4 (finding 6): located 45.248 m, found 45.000 m along the cable from end B.');
    for (const unit of ['m', 'ft'] as const) {
      expect(lengthsInText(note, unit)).toContain(`located ${formatLength(located, unit)}, found ${formatLength(45, unit)} along`);
    }
    expect(lengthsInText(closeoutCalibrationNote(3, 2, 143.24808755767899, 145, 'A'), 'm')).toContain('located 143.2 m, found 145.0 m');
  });
});
