import { SPEED_OF_LIGHT_M_PER_S } from '../../../../shared/cable/propagation';
import { attenuationFromLineConstants } from '../../../../shared/trace/loss';
import { type CableModel, simulate } from '../../../../scripts/sim/line-model';
import { writeLayout } from '../../../../scripts/sim/layouts';
import { defaultAcquisition, type Scenario } from '../../../../scripts/sim/scenario';

/** The cable's attenuation at the given frequencies (0.1, 1 and 10 MHz unless told), as the cable library would hold it. */
export function libraryLoss(cable: CableModel, frequenciesHz: readonly number[] = [1e5, 1e6, 1e7]) {
  const v = cable.vf * SPEED_OF_LIGHT_M_PER_S;
  const lc = { rDcOhmPerM: cable.rdcOhmPerM, skinOhmPerMRootHz: cable.skinOhmPerMRootHz, lHPerM: cable.z0Ohm / v, cFPerM: 1 / (cable.z0Ohm * v), lossTangent: cable.tanDelta };
  return frequenciesHz.map((f) => ({ frequencyHz: f, dbPer100m: attenuationFromLineConstants(lc, f) }));
}

type Network = Parameters<typeof simulate>[0];

/**
 * A record of `network` (the cable's elements and its termination) from the frequency-domain simulator
 * (scripts/sim/line-model.ts), driven from a source of the cable's nominal impedance with the sweep's default
 * acquisition for `lengthM` of that cable, with seeded Gaussian noise of `noiseV` (the incident wave is 1 V),
 * written as a time-ns-mv CSV. A pulse record runs for `spanRoundTrips` round trips of `lengthM` when given.
 */
export function lossyLineTrace(
  cable: CableModel,
  lengthM: number,
  network: Network,
  { mode = 'step', noiseV, spanRoundTrips }: { mode?: 'step' | 'pulse'; noiseV: number; spanRoundTrips?: number },
): string {
  const scenario: Scenario = { name: 'lossy line', cable, lengthM, end: 'open', features: [] };
  const acq = defaultAcquisition(scenario, mode, 1, 0, 16);
  const dt = acq.sampleIntervalS;
  const t0 = acq.preTriggerSamples;
  const n = spanRoundTrips === undefined ? acq.samples : Math.round(t0 + (spanRoundTrips * 2 * lengthM) / (cable.vf * SPEED_OF_LIGHT_M_PER_S) / dt);
  const clean = simulate(network, {
    samples: n,
    sampleIntervalS: dt,
    launchAtS: t0 * dt,
    riseTimeS: acq.riseTimeS,
    sourceV: 2,
    sourceOhm: cable.z0Ohm,
    excitation: mode === 'pulse' ? { kind: 'pulse', widthS: acq.pulseWidthS! } : { kind: 'step' },
  });
  // Gaussian noise by Box–Muller from a linear congruential sequence (the C library's constants).
  let state = 12345;
  const uniform = () => (state = (state * 1103515245 + 12345) % 2147483648) / 2147483648;
  const volts = clean.map((v) => v + noiseV * Math.sqrt(-2 * Math.log(uniform() + 1e-12)) * Math.cos(2 * Math.PI * uniform()));
  const timeS = new Float64Array(n).map((_, i) => (i - t0) * dt);
  return writeLayout({ layout: 'time-ns-mv', timeS, volts, incidentV: 1, instrumentVf: cable.vf, cableName: cable.name });
}
