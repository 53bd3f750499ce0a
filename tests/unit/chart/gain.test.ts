import { describe, expect, it } from 'vitest';
import {
  attenuationAt,
  distanceGain,
  echoFrequencyHz,
  median,
  pulseWithGain,
  stepGainCarry,
  stepWithGain,
  verticalRange,
} from '../../../src/features/traces/chart/gain';
import { pointsForView, zoomRange } from '../../../src/features/traces/chart/view-window';

describe('distance gain', () => {
  it('undoes the round-trip loss: 10^(2·d·α/100/20)', () => {
    // 2 dB/100 m, echo at 150 m: 2·150·2/100 = 6 dB round trip; 10^(6/20) = 1.9953 (decibel definition).
    expect(distanceGain(150, 2)).toBeCloseTo(1.99526, 4);
    // 20 dB round trip (500 m at 2 dB/100 m) is a factor of 10 exactly.
    expect(distanceGain(500, 2)).toBeCloseTo(10, 10);
    expect(distanceGain(0, 2)).toBe(1);
    expect(distanceGain(-5, 2)).toBe(1);
    expect(distanceGain(300, 0)).toBe(1);
  });

  it('stops at 30 dB, however far and lossy', () => {
    // 1259 m at 1.7 dB/100 m would be 42.8 dB round trip; capped at 30 dB = 10^(30/20) = 31.62.
    expect(distanceGain(1259, 1.7)).toBeCloseTo(31.6228, 4);
    expect(distanceGain(1259, 1.7, 60)).toBeCloseTo(10 ** (42.806 / 20), 1);
  });

  it('multiplies a pulse echo’s height above the baseline by the gain at its distance', () => {
    const gainAt = (x: number) => distanceGain(x, 2);
    const out = pulseWithGain(
      [
        { x: 0, y: 1 },
        { x: 500, y: 0.01 + 0.04 },
      ],
      gainAt,
      0.01,
    );
    // The launch at 0 m is untouched; 0.04 above a 0.01 baseline at 500 m becomes 0.4 above it.
    expect(out[0].y).toBe(1);
    expect(out[1].y).toBeCloseTo(0.41, 10);
  });

  it('lifts a step trace’s far edge by the gain where it happens and keeps flat stretches flat', () => {
    // Level 0.5 after the launch, a −0.02 step at 500 m, flat after it. Gain 10 at 500 m → −0.2.
    const gainAt = (x: number) => distanceGain(x, 2);
    const pts = [
      { x: 0, y: 0.5 },
      { x: 400, y: 0.5 },
      { x: 500, y: 0.48 },
      { x: 700, y: 0.48 },
    ];
    const out = stepWithGain(pts, gainAt);
    expect(out.map((p) => p.y)).toEqual([0.5, 0.5, expect.closeTo(0.3, 10), expect.closeTo(0.3, 10)]);
    // A zoomed window starting after the edge continues from the extra height carried so far.
    const carried = stepGainCarry(pts, gainAt, 600);
    expect(carried).toBeCloseTo(-0.18, 10);
    expect(stepWithGain([{ x: 650, y: 0.48 }], gainAt, carried)[0].y).toBeCloseTo(0.3, 10);
  });
});

describe('the attenuation the gain starts from', () => {
  it('reads the library between points on log–log lines and beyond them as √f', () => {
    // Between 10 MHz (2 dB) and 40 MHz (4 dB): 20 MHz is half way on log f → 2·√2 = 2.828 dB (log–log line).
    const lib = [
      { frequencyMhz: 10, dbPer100m: 2 },
      { frequencyMhz: 40, dbPer100m: 4 },
    ];
    expect(attenuationAt(lib, 20e6)).toBeCloseTo(2 * Math.SQRT2, 10);
    // Above the last point: 160 MHz = 4 × 40 MHz → ×√4 = 8 dB. Below the first: 2.5 MHz → 2/2 = 1 dB.
    expect(attenuationAt(lib, 160e6)).toBeCloseTo(8, 10);
    expect(attenuationAt(lib, 2.5e6)).toBeCloseTo(1, 10);
    expect(attenuationAt([], 20e6)).toBeNull();
  });

  it('takes the echo’s frequency as 1/(2·width) for a pulse and 0.35/rise time for a step (common practice)', () => {
    expect(echoFrequencyHz('pulse', 10, null)).toBeCloseTo(50e6, 0);
    expect(echoFrequencyHz('step', null, 3.5)).toBeCloseTo(100e6, 0);
    expect(echoFrequencyHz('step', null, null)).toBeNull();
  });
});

describe('vertical gain and zoom', () => {
  it('shows the whole trace at gain 1 and a range 1/gain as tall around the centre', () => {
    // ys from −0.1 to 1.0: span 1.1 with 10 % room = 1.21.
    const full = verticalRange([-0.1, 0.2, 1.0], 1);
    expect(full.min).toBeCloseTo(0.45 - 0.605, 12);
    expect(full.max).toBeCloseTo(0.45 + 0.605, 12);
    const x8 = verticalRange([-0.1, 0.2, 1.0], 8, 0.5);
    expect(x8.max - x8.min).toBeCloseTo(1.21 / 8, 12);
    expect((x8.max + x8.min) / 2).toBeCloseTo(0.5, 12);
    expect(median([3, 1, 2, 10])).toBe(2.5);
  });

  it('zooms about the anchor and keeps within the record', () => {
    const r = zoomRange({ min: 0, max: 100 }, 2, 25, { min: 0, max: 100 }, 1);
    // Anchor 25 stays a quarter of the way across: span 50 → 12.5…62.5.
    expect(r).toEqual({ min: 12.5, max: 62.5 });
    expect(zoomRange({ min: 0, max: 100 }, 0.5, 90, { min: 0, max: 100 }, 1)).toEqual({ min: 0, max: 100 });
    expect(zoomRange({ min: 0, max: 100 }, 1000, 50, { min: 0, max: 100 }, 2)).toEqual({ min: 49, max: 51 });
  });

  it('draws at most two points per pixel of a 100 000-point trace, and keeps a one-sample spike', () => {
    const n = 100_000;
    const pts = Array.from({ length: n }, (_, i) => ({ x: i, y: i === 61_237 ? 0.9 : 0.25 }));
    const all = pointsForView(pts, 0, n, 300);
    expect(all.length).toBeLessThanOrEqual(600);
    expect(all).toContainEqual({ x: 61_237, y: 0.9 });
    // Zoomed to 200 samples: every sample inside, plus one either side.
    const near = pointsForView(pts, 61_100, 61_300, 300);
    expect(near.length).toBe(202);
    expect(near[0].x).toBe(61_099);
  });
});

describe('the calibrations chart’s axis', () => {
  it('puts one tick per calibration at whole positions, named by number, and thins past ten', async () => {
    const { calibrationTicks } = await import('../../../src/features/calibrations/components/calibration-chart');
    expect(calibrationTicks([12])).toEqual([{ value: 1, label: '#12' }]);
    expect(calibrationTicks([3, 7, 9]).map((t) => t.label)).toEqual(['#3', '#7', '#9']);
    // 25 calibrations: every third one (ceil(25/10) = 3) → positions 1, 4, …, 25: nine ticks.
    const many = calibrationTicks(Array.from({ length: 25 }, (_, i) => 100 + i));
    expect(many.map((t) => t.value)).toEqual([1, 4, 7, 10, 13, 16, 19, 22, 25]);
  });
});
