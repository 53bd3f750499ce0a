import { describe, expect, it } from 'vitest';
import {
  formatLength,
  formatLengthRange,
  formatSignedLength,
  fromUnit,
  lengthDecimals,
  lengthForInput,
  lengthsInText,
  toUnit,
} from '../../../shared/units/format-length';

// 1 ft = 0.3048 m exactly (international yard and pound agreement, 1959).
// Feet values below are the metre values divided by 0.3048, worked by hand.

describe('one precision rule for every length', () => {
  it('keeps two decimals under 10, one under 1000, none from 1000 up', () => {
    expect(lengthDecimals(9.99)).toBe(2);
    expect(lengthDecimals(10)).toBe(1);
    expect(lengthDecimals(999.9)).toBe(1);
    expect(lengthDecimals(1000)).toBe(0);
    expect(formatLength(3.05, 'm')).toBe('3.05 m');
    expect(formatLength(80, 'm')).toBe('80.0 m');
    expect(formatLength(1234.56, 'm')).toBe('1235 m');
  });

  it('chooses the precision from the printed value, so 9.996 is "10.0", not "10.00"', () => {
    expect(formatLength(9.996, 'm')).toBe('10.0 m');
    expect(formatLength(999.96, 'm')).toBe('1000 m');
    expect(formatLength(9.994, 'm')).toBe('9.99 m');
  });

  it('writes feet from metres at 0.3048 m to the foot', () => {
    // 80 m / 0.3048 = 262.467… ft
    expect(formatLength(80, 'ft')).toBe('262.5 ft');
    // 400 m / 0.3048 = 1312.336… ft
    expect(formatLength(400, 'ft')).toBe('1312 ft');
    // 3 m / 0.3048 = 9.8425… ft
    expect(formatLength(3, 'ft')).toBe('9.84 ft');
    // 3.048 m is exactly 10 ft
    expect(formatLength(3.048, 'ft')).toBe('10.0 ft');
    expect(toUnit(0.3048, 'ft')).toBe(1);
    expect(fromUnit(1000, 'ft')).toBeCloseTo(304.8, 12);
  });

  it('shows no sign on a zero and a true minus on a negative', () => {
    expect(formatLength(-0.001, 'm')).toBe('0.00 m');
    expect(formatLength(-12.34, 'm')).toBe('−12.3 m');
    expect(formatSignedLength(1.2, 'm')).toBe('+1.20 m');
    expect(formatSignedLength(-0.45, 'm')).toBe('−0.45 m');
    expect(formatSignedLength(0, 'ft')).toBe('0.00 ft');
  });

  it('writes a dash for a missing value', () => {
    expect(formatLength(null, 'm')).toBe('—');
    expect(formatLength(Number.NaN, 'ft')).toBe('—');
  });

  it('gives both ends of a range the precision of the larger end', () => {
    expect(formatLengthRange(72.31, 87.64, 'm')).toBe('72.3–87.6 m');
    expect(formatLengthRange(9.5, 10.5, 'm')).toBe('9.5–10.5 m');
    // 290 m = 951.44 ft, 310 m = 1017.06 ft
    expect(formatLengthRange(290, 310, 'ft')).toBe('951–1017 ft');
  });
});

describe('metre figures in text Rholog wrote', () => {
  it('rewrites lengths and ranges into feet', () => {
    expect(lengthsInText('events closer than 3.05 m are hidden by the launch', 'ft')).toBe('events closer than 10.0 ft are hidden by the launch');
    // 37 m = 121.39 ft, 43 m = 141.08 ft; 40 m = 131.23 ft
    expect(lengthsInText('40.0 m past splice SP-1, dig window 37.0–43.0 m', 'ft')).toBe('131.2 ft past splice SP-1, dig window 121.4–141.1 ft');
    expect(lengthsInText('located 400.00 m, found 398.50 m of cable (+1.50 m).', 'ft')).toBe('located 1312 ft, found 1307 ft of cable (+4.92 ft).');
  });

  it('leaves rates, areas, other units and lengths already in the reader\'s unit alone', () => {
    const rates = 'at most 1000 dB/100 m, 3 dB per 100 m, 2.5 m/s, 4 m², 12 mm, 5 min';
    expect(lengthsInText(rates, 'ft')).toBe(rates);
    expect(lengthsInText('dig window 37.0–43.0 m', 'm')).toBe('dig window 37.0–43.0 m');
  });

  it('writes a figure already in the reader\'s unit to the one precision rule, so stored text may keep more digits', () => {
    // 143.08 m is 469.42 ft; rounding to 143.1 m first would give 469.49 → "469.5 ft".
    expect(lengthsInText('located 143.08 m along the cable', 'ft')).toBe('located 469.4 ft along the cable');
    expect(lengthsInText('located 143.08 m along the cable', 'm')).toBe('located 143.1 m along the cable');
    expect(lengthsInText('a 12 ft lead', 'ft')).toBe('a 12.0 ft lead');
    // 100,000 m / 0.3048 = 328,083.99 ft; a list "12, 40 m" is not a thousands figure.
    expect(lengthsInText('chainage must be at most 100,000 m', 'ft')).toBe('chainage must be at most 328084 ft');
    expect(lengthsInText('at 12, 40 m', 'm')).toBe('at 12, 40.0 m');
  });

  it('rewrites feet written by someone working in feet for a reader in metres', () => {
    // 1312 ft × 0.3048 = 399.90 m; 10 ft = 3.048 m; 200 dB/1000 ft is a rate.
    expect(lengthsInText('recorded run length 1312 ft; test lead of 10.0 ft taken out, 200 dB/1000 ft', 'm')).toBe(
      'recorded run length 399.9 m; test lead of 3.05 m taken out, 200 dB/1000 ft',
    );
  });
});

describe('a stored length as a form field starts', () => {
  it('keeps enough digits that saving unchanged does not move the value', () => {
    // 400 m = 1312.34 ft to the hundredth; back in metres 1312.34 × 0.3048 = 400.0012 m, 1.2 mm off.
    expect(lengthForInput(400, 'ft')).toBe('1312.34');
    expect(Math.abs(fromUnit(Number(lengthForInput(400, 'ft')), 'ft') - 400)).toBeLessThan(0.0015);
    // 120 m = 393.70 ft: the trailing zero goes.
    expect(lengthForInput(120, 'ft')).toBe('393.7');
    expect(lengthForInput(120.5, 'm')).toBe('120.5');
    expect(lengthForInput(null, 'm')).toBe('');
  });
});
