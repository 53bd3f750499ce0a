import { describe, expect, it } from 'vitest';
import { dropQuantiserStairs } from '../../../shared/trace/detection';
import type { Launch, Measured, WorkingSignal } from '../../../shared/trace/steps';

/**
 * A pulse record from a quiet recorder whose step is 1/64 of the launch's peak (an 8-bit recorder over
 * ±4 V, 2 V launch: quantRaw = 0.03125 / 2), read in launch peaks (pulseRaw), with a launch pulse 60
 * samples wide at half height that rises in 20.
 */
const q = 1 / 64;
const launch = { found: true, widthSamples: 60, riseSamples: 20 } as Launch;

const echo = (opts: Partial<Measured>): Measured => ({
  onsetIdx: 0,
  t50Idx: 0,
  riseSamples: 20,
  height: 0,
  peakDev: 0,
  blip: false,
  snr: 10,
  w: 24,
  endIdx: 0,
  fLo: 0.1,
  echoPeak: 0,
  levelBefore: 0,
  stillMoving: 0,
  ...opts,
});

/** The record: resting on 0, with `parts` added ([from, to) and a level, ramps of 20 samples for the last one). */
function signal(parts: Array<{ from: number; to: number; level: number; ramp?: boolean }>): WorkingSignal {
  const raw = new Float64Array(3000);
  for (const p of parts) {
    for (let i = p.from; i < p.to; i++) {
      const r = p.ramp ? Math.min(1, (i - p.from + 1) / 20, (p.to - i) / 20) : 1;
      raw[i] += p.level * r;
    }
  }
  return { mode: 'pulse', pulseRaw: raw, quantRaw: q } as WorkingSignal;
}

describe('dropping quantiser stairs in a pulse record', () => {
  // The open end's echo, 0.8 of the launch, rises from sample 1420 (a ramp of 20 samples), its onset read
  // at 1440, the middle of its rise; its filter window is 24 samples.
  const end = { from: 1420, to: 1500, level: 0.8, ramp: true };
  const endEcho = echo({ onsetIdx: 1440, endIdx: 1520, height: 0.8, peakDev: 0.8 });

  it('drops a run of the level below whose reading reaches into the next echo’s rise', () => {
    // The run: one level down over 1000–1400, read as an edge from 1000 to 1440 (a wide window of 100),
    // its span ending where the end's echo is already half way up. Its own departure is one level; the
    // end's lead-in (two windows, 48 samples, before its onset: from 1392 on) is not its own.
    const sig = signal([{ from: 1000, to: 1400, level: -q }, end]);
    const run = echo({ onsetIdx: 1000, endIdx: 1440, w: 100, height: -0.02, peakDev: -q });
    const kept = dropQuantiserStairs([run, endEcho], sig, launch);
    expect(kept.map((m) => m.onsetIdx)).toEqual([1440]);
  });

  it('keeps a small echo of its own just before a large one, read over the launch pulse’s extent', () => {
    // An echo two levels high (ρ ≈ 0.03) over 1040–1100, onset read at 1030, ending at 1110, and a large
    // echo rising from 1131 whose onset is read at 1135 with a wide window of 60 (its lead-in of two
    // windows reaches back to 1015, before the small echo begins). The small echo's span still reaches the
    // launch's width and two rises (100 samples) past its onset, to 1130, and holds its own two levels.
    const large = { from: 1131, to: 1211, level: 0.8, ramp: true };
    const sig = signal([{ from: 1040, to: 1100, level: 2 * q, ramp: true }, large]);
    const small = echo({ onsetIdx: 1030, endIdx: 1110, height: 2 * q, peakDev: 2 * q });
    const big = echo({ onsetIdx: 1135, endIdx: 1230, w: 60, height: 0.8, peakDev: 0.8 });
    const kept = dropQuantiserStairs([small, big], sig, launch);
    expect(kept.map((m) => m.onsetIdx)).toEqual([1030, 1135]);
  });

  it('still drops a lone run of one level, with no echo after it', () => {
    const sig = signal([{ from: 1000, to: 1400, level: -q }]);
    const run = echo({ onsetIdx: 1000, endIdx: 1440, w: 100, height: -0.02, peakDev: -q });
    expect(dropQuantiserStairs([run], sig, launch)).toEqual([]);
  });
});
