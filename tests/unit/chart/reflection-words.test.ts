import { describe, expect, it } from 'vitest';
import type { ReflectionEvent } from '../../../shared/schemas/trace-analysis';
import { farEndCheck, isLastReflection, windowHoldsLength } from '../../../src/features/traces/components/far-end-panel';
import { eventMeaning, eventTitle, rhoText } from '../../../src/features/traces/reflection-words';

const event = (over: Partial<ReflectionEvent>): ReflectionEvent => ({
  index: 0,
  roundTripNs: 1000,
  distanceM: 100,
  uncertaintyM: 1,
  windowStartM: 99,
  windowEndM: 101,
  reflectionCoefficient: 0.9,
  impedanceOhm: null,
  type: 'open',
  isCableEnd: false,
  likelyMultipleOf: null,
  amplitude: 0.45,
  snr: 100,
  riseTimeNs: 2,
  ...over,
});

describe('events named by their ρ', () => {
  it('calls an 8 Ω fault on a 30 Ω cable (ρ −0.54) an impedance drop, never a short', () => {
    // ρ = (8 − 30)/(8 + 30) = −0.579 for a change of line; the engine reads −0.54 for this fault and types it
    // from its ρ bands (a short needs ρ ≤ −0.8, common practice).
    const partial = { type: 'impedance-drop' as const, reflectionCoefficient: -0.54 };
    expect(eventTitle(partial)).toBe('Impedance drop · reflection −0.54');
    expect(eventMeaning(partial)).toMatch(/^A strong drop, short of a full short \(that reads beyond −0\.80\)/);
    expect(eventTitle({ type: 'short', reflectionCoefficient: -0.97 })).toBe('Short · reflection −0.97');
    expect(eventMeaning({ type: 'impedance-rise', reflectionCoefficient: 0.12 })).toBe('A rise: a high-resistance joint, a splice or a change of cable.');
    // A far, loss-spread end typed an open from a wider band (classify.ts) is not called a full open.
    expect(eventMeaning({ type: 'open', reflectionCoefficient: 0.72 })).toMatch(/^Read as an open though the reflection is below \+0\.80: nothing real follows it/);
    expect(eventMeaning({ type: 'open', reflectionCoefficient: 0.93 })).toBe('A full open: the cable ends or a conductor is broken here.');
    expect(eventMeaning({ type: 'short', reflectionCoefficient: -0.6 })).toMatch(/^Read as a short though the reflection is above −0\.80/);
    expect(rhoText(0.004)).toBe('reflection 0.00');
    expect(rhoText(0.81)).toBe('reflection +0.81');
  });
});

describe('the far end against the recorded length', () => {
  it('reads 120.4 m on a 120.0 m run inside a 117.6–123.2 m window as the far end, not beyond it', () => {
    const e = event({ distanceM: 120.4, windowStartM: 117.6, windowEndM: 123.2 });
    expect(windowHoldsLength(e, 120)).toBe(true);
    const check = farEndCheck(e, 120, 'm');
    expect(check.tone).toBe('ok');
    // 0.4 m of 120 m is 0.33 %.
    expect(check.text).toBe('The run is recorded as 120.0 m, inside this window: the reading agrees with it (0.40 m longer, 0.3 %, within the velocity factor’s tolerance). This is the far end.');
    expect(farEndCheck(e, 120, 'ft').text).toMatch(/^The run is recorded as 393\.7 ft, inside this window: the reading agrees with it \(1\.31 ft longer/);
  });

  it('says when the reading lies past or short of the recorded length by more than the window', () => {
    const past = farEndCheck(event({ distanceM: 132, windowStartM: 130, windowEndM: 134 }), 120, 'm');
    expect(past.tone).toBe('warn');
    expect(past.text).toMatch(/^This reads 12\.0 m \(10\.0 %\) beyond the recorded 120\.0 m/);
    const short = farEndCheck(event({ distanceM: 100, windowStartM: 98, windowEndM: 102 }), 120, 'm');
    expect(short.text).toMatch(/^This reads 20\.0 m \(16\.7 %\) short of the recorded 120\.0 m, more than the window allows: it may be a fault/);
  });

  it('takes the last reflection that is not an echo as the far end', () => {
    const events = [event({ index: 0, distanceM: 60 }), event({ index: 1, distanceM: 120 }), event({ index: 2, distanceM: 180, likelyMultipleOf: 0 })];
    expect(isLastReflection(events, events[1])).toBe(true);
    expect(isLastReflection(events, events[0])).toBe(false);
    expect(isLastReflection(events, events[2])).toBe(false);
  });
});
