import { describe, expect, it } from 'vitest';
import { twoEndedLocation } from '../../../shared/field/two-ended';

describe('two-ended location d_A = L·t_A/(t_A + t_B)', () => {
  it('gives 400 m from A on a 1000 m cable with 4 µs and 6 µs round trips, whatever the VF', () => {
    // 1000 × 4/(4 + 6) = 400 m (hand-worked).
    const r = twoEndedLocation({ installedLengthM: 1000, roundTripANs: 4000, roundTripBNs: 6000 });
    expect(r.distanceFromAM).toBeCloseTo(400, 9);
    expect(r.distanceFromBM).toBeCloseTo(600, 9);
    // The implied VF: 2L/(c·(t_A + t_B)) = 2000/(299 792 458 × 10e-6) = 0.66713 (hand-worked, c exact by SI definition).
    expect(r.impliedVf).toBeCloseTo(0.66713, 5);
  });

  it('does not move when both times scale together (a different VF)', () => {
    const slow = twoEndedLocation({ installedLengthM: 1000, roundTripANs: 4400, roundTripBNs: 6600 });
    expect(slow.distanceFromAM).toBeCloseTo(400, 9);
  });

  it('reports how far each single-ended reading disagrees', () => {
    // From A the instrument said 410 m (+10 m); from B it said 585 m, i.e. 415 m from A (+15 m) (hand-worked).
    const r = twoEndedLocation({ installedLengthM: 1000, roundTripANs: 4000, roundTripBNs: 6000, singleEndedAM: 410, singleEndedBM: 585 });
    expect(r.disagreementAM).toBeCloseTo(10, 9);
    expect(r.disagreementBM).toBeCloseTo(15, 9);
  });

  it('refuses a zero time or length', () => {
    expect(() => twoEndedLocation({ installedLengthM: 1000, roundTripANs: 0, roundTripBNs: 6000 })).toThrow(/round-trip/);
    expect(() => twoEndedLocation({ installedLengthM: 0, roundTripANs: 1, roundTripBNs: 1 })).toThrow(/length/);
  });
});
