import { describe, expect, it } from 'vitest';
import { rhoText, signedRho } from '../../src/features/traces/reflection-words';

describe('ρ in words', () => {
  it('writes a true minus and an explicit plus at any precision, so "ρ = −1.000" reads as the title "ρ −1.00" does', () => {
    expect(signedRho(-1, 3)).toBe('−1.000');
    expect(signedRho(0.7234, 3)).toBe('+0.723');
    expect(signedRho(-0.0004, 3)).toBe('0.000');
    expect(rhoText(-0.54)).toBe('ρ −0.54');
    expect(rhoText(0)).toBe('ρ 0.00');
  });
});
