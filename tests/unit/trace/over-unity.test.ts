import { describe, expect, it } from 'vitest';
import type { ReflectionEvent } from '../../../shared/schemas/trace-analysis';
import { dropOverUnity } from '../../../shared/trace/analyze';

const ev = (distanceM: number, raw: number, type: ReflectionEvent['type'], likelyMultipleOf: number | null, index: number) =>
  ({
    index,
    distanceM,
    reflectionCoefficient: Math.max(-1, Math.min(1, raw)),
    reflectionCoefficientRaw: raw,
    type,
    likelyMultipleOf,
    isCableEnd: false,
  }) as ReflectionEvent;

describe('edges larger than a passive line can return', () => {
  it('drops an edge read beyond twice the launch, and its echoes, and keeps the rest in order', () => {
    // A returning wave shows at the instrument as (1 + ρ_s)·ρ of the launch, |ρ| ≤ 1 and ρ_s ≤ 1 for any
    // passive source up to an open (Pozar, "Microwave Engineering", §2.3), so at most 2 of the launch.
    // A "short" read at −6.55 of the launch near the start is the launch's own settling; its echo at
    // twice the distance goes with it. A short at −1.4 (a source above the cable's impedance) stays.
    const events = [
      ev(1.98, -6.55, 'short', null, 0),
      ev(3.96, -0.4, 'impedance-drop', 0, 1),
      ev(20.5, 0.3, 'impedance-rise', null, 2),
      ev(46.1, -1.4, 'short', null, 3),
      ev(66.6, -0.42, 'impedance-drop', 2, 4),
    ];
    const warnings = dropOverUnity(events);
    expect(events.map((e) => [e.distanceM, e.index, e.likelyMultipleOf])).toEqual([
      [20.5, 0, null],
      [46.1, 1, null],
      [66.6, 2, 0],
    ]);
    expect(warnings.map((w) => w.code)).toEqual(['OVER_UNITY_IGNORED']);
    expect(warnings[0].message).toMatch(/^2 edge/);
  });
  it('leaves a record with every edge within twice the launch untouched', () => {
    // An open read +2.0 exactly (an open source and an open end) is still a reflection a line can give.
    const events = [ev(10, 2.0, 'open', null, 0), ev(30, -0.9, 'short', null, 1)];
    expect(dropOverUnity(events)).toEqual([]);
    expect(events.map((e) => e.index)).toEqual([0, 1]);
  });
});
