import { describe, expect, it } from 'vitest';
import { proposeVf, SINGLE_CALIBRATION_TOLERANCE, TOLERANCE_FLOOR } from '../../../shared/cable/calibration-proposal';

describe('the VF and tolerance proposed on accepting a calibration', () => {
  it('takes the mean of the accepted ones and the new one, and ±2 s.d. of them as the tolerance', () => {
    // Hand-worked: 0.64, 0.66 accepted, 0.68 new → mean 0.66, s = 0.02 (Σ(x − x̄)² = 0.0008 over n − 1 = 2);
    // 2·0.02/0.66 = 0.0606… → rounded up to 0.061.
    const p = proposeVf([0.64, 0.66], 0.68, 0.15);
    expect(p.count).toBe(3);
    expect(p.vf).toBe(0.66);
    expect(p.stdDev).toBeCloseTo(0.02, 12);
    expect(p.vfTolerance).toBe(0.061);
    expect(p.rule).toBe('spread');
  });

  it('never proposes less than the 1 % floor (common practice), however tight the spread', () => {
    // 0.660, 0.661, 0.662 → s = 0.001, 2·s/mean = 0.30 % < 1 %.
    const p = proposeVf([0.66, 0.661], 0.662, 0.15);
    expect(p.vf).toBe(0.661);
    expect(p.vfTolerance).toBe(TOLERANCE_FLOOR);
    expect(p.rule).toBe('floor');
  });

  it('with one calibration, proposes 2 % or the present tolerance if tighter, and says so', () => {
    const wide = proposeVf([], 0.6543, 0.15);
    expect(wide).toMatchObject({ count: 1, vf: 0.6543, stdDev: null, vfTolerance: SINGLE_CALIBRATION_TOLERANCE, rule: 'single' });
    expect(proposeVf([], 0.6543, 0.015).vfTolerance).toBe(0.015);
    expect(proposeVf([], 0.6543, 0.002).vfTolerance).toBe(TOLERANCE_FLOOR);
  });

  it('rounds the VF to the library’s four decimals', () => {
    // (0.6581 + 0.6590) / 2 = 0.65855 → 0.6586 (half up; the float sits just above).
    expect(proposeVf([0.6581], 0.659, 0.15).vf).toBeCloseTo(0.6586, 10);
  });
});
