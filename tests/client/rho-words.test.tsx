import { describe, expect, it } from 'vitest';
import { rhoText, signedRho, trueMinusInText, warningWords } from '../../src/features/traces/reflection-words';

describe('ρ in words', () => {
  it('writes a true minus and an explicit plus at any precision, so "Reflection coefficient −1.000" reads as the title "reflection −1.00" does', () => {
    expect(signedRho(-1, 3)).toBe('−1.000');
    expect(signedRho(0.7234, 3)).toBe('+0.723');
    expect(signedRho(-0.0004, 3)).toBe('0.000');
    expect(rhoText(-0.54)).toBe('reflection −0.54');
    expect(rhoText(0)).toBe('reflection 0.00');
  });
});

describe("the engine's notes on a trace page", () => {
  // As shared/trace/analyze.ts writes them for a negative echo (toFixed gives a hyphen-minus).
  const pulseLoss = {
    code: 'PULSE_LOSS',
    message: `the echo at 142.6 m is spread by cable loss (peak ${(-0.0412).toFixed(2)} of the launch); its ρ is taken from the echo's area`,
  };
  const source = {
    code: 'SOURCE_MISMATCH',
    message: `the instrument's source reflects returning waves (ρ ≈ ${(-0.123).toFixed(2)}, from the echo at twice the strongest round trip); reflection coefficients are corrected for it and its echoes are marked`,
  };

  it('write a negative figure with the true minus, as the rest of the page does', () => {
    expect(warningWords(pulseLoss, 1.2, 'm')).toBe(
      "the echo at 142.6 m is spread by cable loss (peak −0.04 of the launch); its ρ is taken from the echo's area",
    );
    expect(warningWords(source, 1.2, 'm')).toContain('(ρ ≈ −0.12, from the echo');
    expect(warningWords(pulseLoss, 1.2, 'ft')).toContain(
      'the echo at 467.8 ft is spread by cable loss (peak −0.04 of the launch)',
    );
  });

  it('leaves a hyphen inside a name or between figures alone, and gives a figure that is zero no sign', () => {
    expect(trueMinusInText('past HH-1 toward end A, cases 3-5, peak -0.00, ρ -1')).toBe(
      'past HH-1 toward end A, cases 3-5, peak 0.00, ρ −1',
    );
    expect(trueMinusInText('-0.5 at the start')).toBe('−0.5 at the start');
    expect(trueMinusInText('peak +0.04')).toBe('peak +0.04');
  });
});
