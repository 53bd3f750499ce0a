import { describe, expect, it } from 'vitest';
import { mergeEdges } from '../../../shared/trace/detection';
import type { Launch, Measured } from '../../../shared/trace/steps';

const edge = (h: number, opts: Partial<Measured> = {}): Measured => ({
  onsetIdx: 0,
  t50Idx: 0,
  riseSamples: 4,
  height: h,
  peakDev: h,
  blip: false,
  snr: 20,
  w: 15,
  endIdx: 0,
  fLo: 0.1,
  echoPeak: h,
  levelBefore: 0,
  stillMoving: 0,
  ...opts,
});

const launch = { widthSamples: null } as Launch;

describe('merging edges', () => {
  // A dip of ρ −0.035 on a lossy line, measured as a blip (the level is back within two
  // windows), whose slow way back is caught 22 samples after its end as a rise of 0.016
  // measured from inside the dip (level −0.016 there, back to 0 after).
  const dip = () => edge(-0.035, { blip: true, peakDev: -0.035, onsetIdx: 1961, endIdx: 1979, levelBefore: 0 });

  it('takes the way back from a blip as part of it, not as an event of its own', () => {
    const back = edge(0.016, { onsetIdx: 2001, endIdx: 2061, levelBefore: -0.016 });
    const merged = mergeEdges([dip(), back], 5, launch);
    expect(merged).toHaveLength(1);
    expect(merged[0].blip).toBe(true);
    expect(merged[0].endIdx).toBe(2061);
  });

  it('keeps an edge after a blip that leaves the level somewhere new', () => {
    // The same timing, but the rise ends 0.05 above the level before the dip: a real rise.
    const rise = edge(0.066, { onsetIdx: 2001, endIdx: 2061, levelBefore: -0.016, peakDev: 0.066 });
    expect(mergeEdges([dip(), rise], 5, launch)).toHaveLength(2);
  });

  it('keeps both edges of a flat section: only a blip is merged with its way back', () => {
    // A wet section: a drop of 0.2, flat for 60 samples, then the rise back (two events).
    const drop = edge(-0.2, { onsetIdx: 1000, endIdx: 1030, levelBefore: 0 });
    const rise = edge(0.2, { onsetIdx: 1060, endIdx: 1090, levelBefore: -0.2 });
    expect(mergeEdges([drop, rise], 5, launch)).toHaveLength(2);
  });

  describe('in a pulse record', () => {
    // A launch pulse 79 samples wide at half height with rises of 23: one edge is 79 + 2·23 = 125 samples.
    const pulse = { widthSamples: 79, riseSamples: 23 } as Launch;
    const drop = (at: number) => edge(-0.17, { onsetIdx: at, endIdx: at + 170, riseSamples: 90, w: 32 });
    const rise = (at: number) => edge(0.17, { onsetIdx: at, endIdx: at + 170, riseSamples: 90, w: 32 });

    it('keeps the two echoes of a splice apart once they arrive more than one launch edge apart', () => {
      // 192 samples apart (a splice 2.2 m long on a line of VF 0.52 sampled every 0.145 ns).
      expect(mergeEdges([drop(13170), rise(13362)], 32, pulse)).toHaveLength(2);
    });

    it('merges them into one blip when they overlap within one launch edge', () => {
      const merged = mergeEdges([drop(13170), rise(13270)], 32, pulse);
      expect(merged).toHaveLength(1);
      expect(merged[0].blip).toBe(true);
    });
  });
});
