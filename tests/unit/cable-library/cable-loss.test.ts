import { describe, expect, it } from 'vitest';
import { attenuationAt, engineLoss, libraryAnalysisOptions, pulseWidthVf } from '../../../server/cables/cable-loss';

const DB_PER_NEPER = 20 / Math.LN10; // 8.686 dB per neper (definition of the neper)

describe('attenuation from line constants', () => {
  // A 50 Ω line: L = 2.5e-7 H/m, C = 1e-10 F/m (Z0 = √(L/C) = 50 Ω).
  const line = { lHPerM: 2.5e-7, cFPerM: 1e-10, rDcOhmPerM: 0, skinOhmPerMRootHz: 0, gSPerM: 0, lossTangent: 0 };

  it('gives the low-loss conductor term α = R/(2·Z0) (Pozar, Microwave Engineering, 4th ed., eq. 2.85)', () => {
    // R = 0.1 Ω/m at 100 MHz, where ωL = 157 Ω/m ≫ R: α = 0.1/100 = 1e-3 Np/m = 0.8686 dB/100 m.
    expect(attenuationAt({ ...line, rDcOhmPerM: 0.1 }, 1e8)).toBeCloseTo(1e-3 * DB_PER_NEPER * 100, 3);
  });

  it('gives the low-loss dielectric term α = β·tanδ/2 (Pozar eq. 2.85 with G = ωC·tanδ)', () => {
    // β = ω√(LC) = 2π·1e8·5e-9 = 3.1416 rad/m; tanδ = 1e-3: α = 1.5708e-3 Np/m = 1.3644 dB/100 m.
    expect(attenuationAt({ ...line, lossTangent: 1e-3 }, 1e8)).toBeCloseTo(1.5708e-3 * DB_PER_NEPER * 100, 3);
  });

  it('gives α = √(ωRC/2) where R ≫ ωL, the diffusion limit of a telephone pair (common practice)', () => {
    // 0.5 mm pair at 1 kHz: R = 0.176 Ω/m, ωL = 3.2e-3 Ω/m, C = 5.05e-11 F/m: √(2π·1e3·0.176·5.05e-11/2) = 1.668e-4 Np/m.
    const pair = { lHPerM: 5.05e-7, cFPerM: 5.05e-11, rDcOhmPerM: 0.176 };
    expect(attenuationAt(pair, 1e3) / (DB_PER_NEPER * 100)).toBeCloseTo(1.668e-4, 5);
  });

  it('adds the skin term as a surface impedance R_s(1 + j) (Pozar §1.7), so it raises both R and the reactance', () => {
    const skin = { ...line, skinOhmPerMRootHz: 1e-4 };
    // R_s = 1e-4·√f: 1 Ω/m at 100 MHz, 0.31623 Ω/m at 10 MHz. Low-loss α = R_s/(2·Z0') with
    // Z0' = √((ωL + R_s)/(ωC)): 50.159 Ω and 50.500 Ω, so α = 9.9683e-3 and 3.1310e-3 Np/m.
    expect(attenuationAt(skin, 1e8) / (DB_PER_NEPER * 100)).toBeCloseTo(9.9683e-3, 6);
    expect(attenuationAt(skin, 1e7) / (DB_PER_NEPER * 100)).toBeCloseTo(3.131e-3, 6);
  });
});

describe('what an analysis takes from the library', () => {
  const pulseVfs = [
    { pulseWidthNs: 100, vf: 0.655, source: 'yard' },
    { pulseWidthNs: 1000, vf: 0.628, source: 'yard' },
  ];

  it('takes a recorded pulse-width VF only when the widths agree within 5 %', () => {
    expect(pulseWidthVf(pulseVfs, 1000)?.vf).toBe(0.628);
    expect(pulseWidthVf(pulseVfs, 1040)?.vf).toBe(0.628);
    expect(pulseWidthVf(pulseVfs, 1060)).toBeNull();
    expect(pulseWidthVf(pulseVfs, 300)).toBeNull();
    expect(pulseWidthVf(pulseVfs, undefined)).toBeNull();
  });

  it('lets an explicit VF win over a pulse-width VF, and that win over the entry', () => {
    const cable = { vf: 0.66, pulseVfs, attenuation: [] };
    expect(libraryAnalysisOptions(cable, 100, undefined)).toEqual({ vf: 0.655, vfPulseWidthNs: 100 });
    expect(libraryAnalysisOptions(cable, 250, undefined)).toEqual({ vf: 0.66 });
    expect(libraryAnalysisOptions(cable, 100, 0.7)).toEqual({ vf: 0.7 });
  });

  it('passes attenuation points in hertz, or points worked out from the line constants', () => {
    expect(engineLoss({ attenuation: [{ frequencyMhz: 10, dbPer100m: 5.5 }] })).toEqual([{ frequencyHz: 1e7, dbPer100m: 5.5 }]);
    const fromConstants = engineLoss({ attenuation: [], lHPerM: 2.5e-7, cFPerM: 1e-10, rDcOhmPerM: 0.1 });
    expect(fromConstants?.map((p) => p.frequencyHz)).toEqual([1e4, 1e5, 1e6, 1e7, 1e8, 1e9]);
    expect(fromConstants?.[4].dbPer100m).toBeCloseTo(0.8686, 3);
    expect(engineLoss({ attenuation: [] })).toBeUndefined();
  });
});
