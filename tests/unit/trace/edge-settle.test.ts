import { describe, expect, it } from 'vitest';
import { settleLossyEdge } from '../../../shared/trace/edge-fit';
import { erfc } from '../../../shared/trace/loss';
import { measureOnset } from '../../../shared/trace/onset';

/**
 * A loss-spread edge of height 0.2 in the working signal: the skin effect's erfc(K/2√t) step
 * (R. L. Wigington and N. S. Nahman, Proc. IRE 45 (1957) 166) starting at sample 1,000 with its
 * 50 % point 300 samples later (K/2√t50 = 0.4769), optionally on a ramp that starts with it:
 * what a pulse record's running integral shows when an offset follows the echo.
 */
function edge(ramp: number): Float64Array {
  const u = new Float64Array(60000);
  const a = 0.4769 * 2 * Math.sqrt(300);
  for (let i = 1000; i < u.length; i++) {
    const t = i - 1000;
    u[i] = (t > 0 ? 0.2 * erfc(a / (2 * Math.sqrt(t))) : 0) + ramp * t;
  }
  return u;
}

function settle(u: Float64Array) {
  // First reading, as the edge fit makes it: the level two windows of 200 samples past the edge.
  const h0 = u[1400];
  const r = measureOnset(u, 1400, () => 0, h0, 0.1, 500, 1600);
  return settleLossyEdge(u, { r, height: h0, fLo: 0.1 }, 0, 200, u.length, 500, 1e-4);
}

describe('settling a loss-spread edge', () => {
  it('follows the edge up to most of its height on a flat baseline', () => {
    const s = settle(edge(0));
    // erfc(K/2√t) reaches 0.83 of the height at t = 25·t50 (common practice for a skin-effect edge).
    expect(s.height).toBeGreaterThan(0.15);
    expect(s.height).toBeLessThanOrEqual(0.2);
  });

  it('stops where the level runs away on a ramp instead of settling', () => {
    // A ramp of 2e-5 per sample would add 0.2 in 10,000 samples: the widening windows would chase it.
    const s = settle(edge(2e-5));
    expect(s.height).toBeGreaterThan(0.12);
    expect(s.height).toBeLessThan(0.3);
  });
});
