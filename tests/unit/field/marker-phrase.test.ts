import { describe, expect, it } from 'vitest';
import { describeRoutePosition, markerPhrase, routePosition, type RunLike } from '../../../shared/field/route-position';

describe('a marker named with its kind', () => {
  it('puts the kind before a label that does not say it', () => {
    expect(markerPhrase('manhole', 'MH-2')).toBe('manhole MH-2');
    expect(markerPhrase('Splice', 'SP-4')).toBe('Splice SP-4');
  });

  it('leaves out the kind when the label already begins with its word, in any case', () => {
    expect(markerPhrase('pole', 'Pole 9')).toBe('Pole 9');
    expect(markerPhrase('Pole', 'pole-3')).toBe('pole-3');
    expect(markerPhrase('road crossing', 'Road crossing 2')).toBe('Road crossing 2');
    expect(markerPhrase('pole', 'POLE')).toBe('POLE');
  });

  it('keeps the kind when the label only begins with the same letters', () => {
    expect(markerPhrase('pole', 'Polestar yard')).toBe('pole Polestar yard');
    expect(markerPhrase('cabinet', 'Cab 4')).toBe('cabinet Cab 4');
  });

  it('says "past Pole 9", not "past pole Pole 9", in a route position', () => {
    // 1450 m of cable: 5 m coiled at each pole, 8 m at SP-4 (invented run).
    const run: RunLike = {
      installedLengthM: 1450,
      endALabel: 'Pump house cabinet',
      endBLabel: 'Reservoir outstation',
      markers: [
        { label: 'Pole 3', kind: 'pole', chainageM: 210, slackM: 5 },
        { label: 'Pole 9', kind: 'pole', chainageM: 640, slackM: 5 },
        { label: 'SP-4', kind: 'splice', chainageM: 980, slackM: 8 },
      ],
    };
    // 811 m of cable from A less the two 5 m coils = 801 m of route, 161 m past Pole 9 (hand-worked).
    const p = routePosition(run, 'A', 811, { startM: 808, endM: 814 });
    expect(describeRoutePosition(p, 'm')).toBe('161.0 m past Pole 9 toward splice SP-4; dig on the ground 158.0–164.0 m past Pole 9');
    // 300 m from A: 295 m of route, between Pole 3 and Pole 9.
    const q = routePosition(run, 'A', 300, { startM: 299, endM: 301 });
    expect(describeRoutePosition(q, 'm')).toBe('85.0 m past Pole 3 toward Pole 9; search the span 84.0–86.0 m past Pole 3');
  });
});
