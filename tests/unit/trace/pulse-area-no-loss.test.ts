import { describe, expect, it } from 'vitest';
import { analyzeCsv } from '../../../shared/trace';
import { COAX_75 } from '../../../scripts/sim/cables';
import { writeLayout } from '../../../scripts/sim/layouts';
import { defaultAcquisition, type Scenario, simulateScenario } from '../../../scripts/sim/scenario';

/**
 * A pulse record of a short foam coax, noisy enough that the cable's loss cannot be read from it and
 * none is given: the engine reads it with no loss model at all. The line fit's shape is then the launch
 * pulse itself, narrower than the echo the line spread, and a narrow shape fitted to a spread echo reads
 * it short; the echo's area, which the skin effect keeps, is its ρ. The check values are the
 * frequency-domain simulator's own (scripts/sim): a short (ρ = −1) at 40 m.
 */
function record(seed: number) {
  const scenario: Scenario = { name: 'coax-75-40m', cable: COAX_75, lengthM: 40, end: 'short', features: [] };
  const acq = defaultAcquisition(scenario, 'pulse', seed, 0.1, 12);
  const sim = simulateScenario(scenario, acq);
  return writeLayout({ layout: 'time-ns-mv', timeS: sim.timeS, volts: sim.volts, incidentV: sim.incidentV, instrumentVf: COAX_75.vf, cableName: COAX_75.name });
}

describe('ρ of a pulse echo read with no loss model', () => {
  it('is the echo’s area, not the height of the launch’s own shape fitted to the spread echo', () => {
    const a = analyzeCsv(record(1), {}, { vf: COAX_75.vf, z0Ohm: COAX_75.z0Ohm });
    expect(a.mode).toBe('pulse');
    expect(a.lossSource).toBe('none');
    const end = a.events.find((e) => Math.abs(e.distanceM - 40) < 1)!;
    expect(end, JSON.stringify(a.events)).toBeDefined();
    // The area reading, as read before the line fit, and not corrected for any loss.
    expect(end.reflectionCoefficient).toBe(end.reflectionCoefficientRaw);
    expect(end.lossCorrected).toBe(false);
    // The spread echo's area gives back most of the short (the launch's shape fitted to it read −0.54).
    expect(end.reflectionCoefficient).toBeLessThan(-0.65);
    expect(end.reflectionCoefficient).toBeGreaterThanOrEqual(-1);
  });
});
