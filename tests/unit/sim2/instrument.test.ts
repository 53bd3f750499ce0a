import { describe, expect, it } from 'vitest';
import { record } from '../../../scripts/sim2/instrument';
import { writeTrace } from '../../../scripts/sim2/layouts';
import { makeRng } from '../../../scripts/sim2/rng';

describe('instrument quirks', () => {
  const n = 20000;
  const clean = new Float64Array(n).fill(0.5);
  const base = {
    offsetV: 0,
    driftV: 0,
    bits: 16 as const,
    fullScaleV: 2,
    colouredSigmaV: 0,
    colour: 'none' as const,
    ar1: 0.95,
    seed: 1,
  };

  it('adds noise of the σ that the SNR defines: SNR = 20·log10(V+/σ)', () => {
    // 26 dB on V+ = 1 V: σ = 10^(−26/20) = 0.0501 V (definition of the decibel for amplitudes, common practice).
    const sigma = 10 ** (-26 / 20);
    const r = record(clean, { ...base, whiteSigmaV: sigma }, makeRng(7));
    let s = 0;
    let s2 = 0;
    for (const v of r.volts) {
      s += v - 0.5;
      s2 += (v - 0.5) ** 2;
    }
    const sd = Math.sqrt(s2 / n - (s / n) ** 2);
    expect(sd).toBeGreaterThan(0.0501 * 0.97);
    expect(sd).toBeLessThan(0.0501 * 1.03);
    expect(r.clipped).toBe(false);
  });

  it('quantises to the ADC step 2·FS/2^bits and clips at full scale', () => {
    // An 8-bit ADC over ±1 V has 256 codes 7.8125 mV apart, from −1 V to +0.9921875 V.
    const ramp = Float64Array.from({ length: 1001 }, (_, i) => -1.5 + (3 * i) / 1000);
    const r = record(ramp, { ...base, bits: 8, fullScaleV: 1, whiteSigmaV: 0 }, makeRng(1));
    const lsb = 2 / 256;
    for (const v of r.volts) expect(Math.abs(v / lsb - Math.round(v / lsb))).toBeLessThan(1e-9);
    expect(Math.min(...r.volts)).toBe(-1);
    expect(Math.max(...r.volts)).toBeCloseTo(1 - lsb, 12);
    expect(r.clipped).toBe(true);
    // Held at the limit: the samples of the ramp beyond the codes −128…+127 (below −1 − lsb/2 and above
    // 1 − lsb/2): the first 166 and the last 168 of the 1001.
    const held = [...r.atLimit].map((x, i) => (x ? i : -1)).filter((i) => i >= 0);
    expect(held.filter((i) => i < 500).length).toBe(Math.ceil((-1 - lsb / 2 + 1.5) / 0.003));
    expect(held.filter((i) => i > 500).length).toBe(1001 - Math.ceil((1 - lsb / 2 + 1.5) / 0.003));
    expect(r.atLimit[500]).toBe(0);
  });

  it('adds drift linearly from the first sample to the last', () => {
    const r = record(new Float64Array(11), { ...base, driftV: 0.1, whiteSigmaV: 0 }, makeRng(1));
    expect(r.volts[0]).toBeCloseTo(0, 4);
    expect(r.volts[5]).toBeCloseTo(0.05, 4);
    expect(r.volts[10]).toBeCloseTo(0.1, 4);
  });
});

describe('CSV layouts of the second simulator', () => {
  const t = Float64Array.from([0, 1e-9, 2e-9]);
  const v = Float64Array.from([1, 0.5, 0.25]);
  const common = {
    timeS: t,
    volts: v,
    incidentV: 1,
    mode: 'pulse' as const,
    instrumentVf: 0.56,
    cableName: 'test cable',
    z0Ohm: 30,
  };

  it('writes half the propagation speed in m/µs: v/2 = VF·c/2', () => {
    // c = 299 792 458 m/s exactly (SI definition of the metre): 0.56 · 299.792458 / 2 = 83.94 m/µs.
    const csv = writeTrace({ ...common, layout: 'metres-velocity-note', velocityNote: 'half-velocity' });
    expect(csv.split('\n')[0]).toBe('v/2 = 83.9 m/µs');
    // 1 ns of round trip at VF 0.56 is 0.56 · 0.299792458 / 2 = 0.0839419 m.
    expect(csv.split('\n')[3]).toBe('0.08394188824,0.5');
  });

  it('writes a pulse from 0 m with the velocity as a percentage', () => {
    const csv = writeTrace({ ...common, layout: 'pulse-metres-from-zero', velocityNote: 'nvp-percent', pulseWidthS: 5e-9 });
    const lines = csv.split('\n');
    expect(lines.slice(0, 4)).toEqual(['Cable: test cable', 'NVP 56%', 'Pulse width: 5 ns', 'Distance (m),Amplitude (V)']);
    expect(lines[4]).toBe('0,1');
  });

  it('writes oscilloscope channels with the trace in the chosen column', () => {
    const csv = writeTrace({ ...common, layout: 'scope-channels', channels: { count: 3, traceIndex: 1, seed: 3 } });
    const lines = csv.split('\r\n');
    expect(lines[0]).toBe('Time (s),CH1 (V),CH2 (V),CH3 (V)');
    expect(lines[2].split(',')[2]).toBe('0.5');
  });

  it('writes pulses in ρ units as the fraction of the launched pulse', () => {
    const csv = writeTrace({ ...common, incidentV: 2, layout: 'pulse-rho-time' });
    expect(csv.split('\n').slice(1, 4)).toEqual(['time (ns),rho', '0,0.5', '1,0.25']);
  });
});
