import type { AnalysisCable } from '../../../server/traces/analysis';
import type { CableTypeView } from '../../../shared/schemas/cables';

/** A library entry as the engine takes it: the same values the server's analysis reads from the cable type's row. */
export function analysisCableOf(c: CableTypeView): AnalysisCable {
  return {
    vf: c.vf,
    vfTolerance: c.vfTolerance,
    z0Ohm: c.z0Ohm,
    attenuation: c.attenuation,
    pulseVfs: c.pulseVfs,
    rDcOhmPerM: c.rDcOhmPerM,
    skinOhmPerMRootHz: c.skinOhmPerMRootHz,
    lHPerM: c.lHPerM,
    cFPerM: c.cFPerM,
    gSPerM: c.gSPerM,
    lossTangent: c.lossTangent,
  };
}
