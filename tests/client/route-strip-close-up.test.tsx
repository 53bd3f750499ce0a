import { describe, expect, it } from 'vitest';
import { closeUpSpan } from '../../src/features/locate/components/route-strip';

// Oakhollow's OH-D1 of the demo: 88 m installed, 1 m coiled at the Duct pit handhole at 40 m → 87 m of route.
const places = [
  { label: 'A', chainageM: 0, kind: 'end' as const },
  { label: 'Duct pit', chainageM: 40, kind: 'marker' as const },
  { label: 'B', chainageM: 87, kind: 'end' as const },
];

describe('the route strip’s second strip', () => {
  it('is titled by the two places it runs between when it spans marker to marker, not as a close-up of the window', () => {
    // A 4.5 m window at 60–64.5 m: the stretch shown is 40–87 m, ten times the window.
    const span = closeUpSpan(places, { windowStartChainageM: 60, windowEndChainageM: 64.5 }, 87);
    expect(span).toEqual({ fromM: 40, toM: 87, title: 'Between Duct pit and end B, around the dig window' });
  });

  it('is a close-up of the window when the places around it are nearer than three windows', () => {
    // A 20 m window at 45–65 m between the Duct pit (40 m) and end B (87 m): 47 m is under 60 m, so 25–85 m is shown.
    const span = closeUpSpan(places, { windowStartChainageM: 45, windowEndChainageM: 65 }, 87);
    expect(span).toEqual({ fromM: 25, toM: 85, title: 'Close-up of the dig window' });
  });
});
