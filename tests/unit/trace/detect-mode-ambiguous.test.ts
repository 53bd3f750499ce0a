import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { parsedTrace } from '../../support/parsed-trace';

/**
 * The scikit-rf reference of a 25 m polyethylene coax ending in a short (tests/fixtures, ρ step
 * response), as an instrument's volts step record (1 + ρ from time zero) with the range set three
 * times past the cable: the level held after the short, with noise of 0.002. The record climbs
 * and falls back, which is also what a wide pulse with no echo looks like.
 */
function extendedShort(): Float64Array {
  const text = readFileSync(join(__dirname, '../../fixtures/traces/reference/pe-coax-25m-short.csv'), 'utf8');
  const rows = text
    .split('\n')
    .filter((l) => /^\s*-?[0-9]/.test(l))
    .map((l) => l.split(',').map(Number));
  const rho = rows.map((r) => r[1]);
  const t = rows.map((r) => r[0]);
  const tail = [...rho.slice(-50)].sort((a, b) => a - b)[25];
  const rnd = gaussianSource(6);
  const n = rho.length * 3;
  return new Float64Array(n).map((_, i) => {
    const ti = i < t.length ? t[i] : 0;
    const r = i < rho.length ? rho[i] : tail;
    return (i < t.length && ti < 0 ? 0 : 1 + r) + 0.002 * rnd();
  });
}

describe('a record that is a step into a short or a wide pulse with no echo', () => {
  it('names the short the step reading finds when the pulse reading finds nothing', () => {
    const y = extendedShort();
    // 100 ps samples from −5 ns, as the reference file.
    const a = analyzeTrace(parsedTrace(y, { dtS: 1e-10, t0S: -5e-9 }), { vf: 1 / 1.5 });
    // Read as a pulse record, no echo: the step reading's short at 25 m is named beside "no reflection".
    expect(a.mode).toBe('pulse');
    expect(a.events).toHaveLength(0);
    const note = a.warnings.find((w) => w.code === 'MODE_AMBIGUOUS');
    expect(note?.message).toMatch(/short at 2[45]\.\d\d m/);
  });
});
