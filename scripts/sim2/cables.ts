/**
 * Cable families for the second simulator, drawn at random within typical
 * ranges. Per-metre values come from textbook formulas: DC loop resistance
 * 2ρ/A with copper ρ = 1.724e-8 Ω·m (IEC 60028 annealed copper standard);
 * skin-effect resistance from the surface resistance √(π f μ0 / σ) over the
 * conductor's perimeter (S. Ramo, J. R. Whinnery, T. Van Duzer, "Fields and
 * Waves in Communication Electronics", 3rd ed., §5.6), raised by a proximity
 * factor for twisted pairs and multi-core cables; attenuation α = R/(2Z0) +
 * G·Z0/2 for a low-loss line (D. M. Pozar, "Microwave Engineering", 4th ed.,
 * §2.7). The ranges (impedance, velocity factor, attenuation at a stated
 * frequency) are typical of each family from memory of datasheets, not any
 * one product.
 */
import type { CableRlgc } from './fdtd';
import type { Rng } from './rng';

export const CABLE_KINDS = ['coax-50', 'coax-75', 'pair', 'power-lv', 'power-mv'] as const;
export type CableKind = (typeof CABLE_KINDS)[number];

export interface Cable extends CableRlgc {
  kind: CableKind;
  name: string;
}

const RHO_CU = 1.724e-8;
const MU0 = 4e-7 * Math.PI;
const SIGMA_CU = 1 / RHO_CU;
/** Surface resistance per √Hz of copper: √(π μ0 / σ). */
const RSURF_CU = Math.sqrt((Math.PI * MU0) / SIGMA_CU);

/** Rs (Ω/m/√Hz) that gives `dbPer100m` of conductor loss at frequency f on impedance z0. */
function skinFromLoss(dbPer100m: number, fHz: number, z0: number): number {
  const alphaNpPerM = dbPer100m / 100 / 8.686;
  return (2 * z0 * alphaNpPerM) / Math.sqrt(fHz);
}

export function drawCable(kind: CableKind, rng: Rng): Cable {
  switch (kind) {
    case 'coax-50': {
      const foam = rng.chance(0.4);
      const vf = foam ? rng.uniform(0.78, 0.86) : rng.uniform(0.65, 0.67);
      const z0 = rng.uniform(49, 51);
      // Conductor loss 5–20 dB/100 m at 100 MHz, thin to thick 50 Ω cables.
      const db100 = rng.logUniform(5, 20);
      return {
        kind,
        name: `${foam ? 'foam' : 'solid'}-PE coax 50 Ω`,
        z0Ohm: z0,
        vf,
        rdcOhmPerM: rng.logUniform(0.008, 0.06),
        skinOhmPerMRootHz: skinFromLoss(db100, 1e8, z0),
        tanDelta: foam ? rng.uniform(5e-5, 2e-4) : rng.uniform(1.5e-4, 5e-4),
      };
    }
    case 'coax-75': {
      const z0 = rng.uniform(74, 76);
      return {
        kind,
        name: 'foam coax 75 Ω',
        z0Ohm: z0,
        vf: rng.uniform(0.8, 0.88),
        rdcOhmPerM: rng.logUniform(0.004, 0.03),
        skinOhmPerMRootHz: skinFromLoss(rng.logUniform(3, 12), 1e8, z0),
        tanDelta: rng.uniform(5e-5, 3e-4),
      };
    }
    case 'pair': {
      const d = rng.pick([0.4, 0.5, 0.6, 0.9]);
      const area = (Math.PI * (d * 1e-3) ** 2) / 4;
      // Twist makes each conductor ~2 % longer than the pair.
      const rdc = ((2 * RHO_CU) / area) * 1.02;
      const proximity = rng.uniform(1.2, 1.6);
      const rs = ((2 * RSURF_CU) / (Math.PI * d * 1e-3)) * proximity * 1.02;
      return {
        kind,
        name: `${d} mm telecom pair`,
        z0Ohm: rng.uniform(98, 122),
        vf: rng.uniform(0.6, 0.72),
        rdcOhmPerM: rdc,
        skinOhmPerMRootHz: rs,
        tanDelta: rng.logUniform(2e-4, 2e-3),
      };
    }
    case 'power-lv': {
      const mm2 = rng.pick([16, 25, 35, 50, 95, 150, 240]);
      const r = Math.sqrt((mm2 * 1e-6) / Math.PI);
      const rdc = (2 * RHO_CU) / (mm2 * 1e-6);
      const proximity = rng.uniform(1.5, 2.5);
      return {
        kind,
        name: `LV power cable ${mm2} mm², core to core`,
        z0Ohm: rng.uniform(25, 50),
        vf: rng.uniform(0.5, 0.62),
        rdcOhmPerM: rdc,
        skinOhmPerMRootHz: ((2 * RSURF_CU) / (2 * Math.PI * r)) * proximity,
        tanDelta: rng.logUniform(3e-3, 1.5e-2),
      };
    }
    case 'power-mv': {
      const mm2 = rng.pick([95, 150, 240, 400, 630]);
      const rdc = RHO_CU / (mm2 * 1e-6) + rng.uniform(1e-4, 3e-4); // core + copper-wire screen
      return {
        kind,
        name: `MV XLPE cable ${mm2} mm², core to screen`,
        z0Ohm: rng.uniform(20, 42),
        vf: rng.uniform(0.5, 0.6),
        rdcOhmPerM: rdc,
        // Semiconducting screens add to the metal's skin loss: 0.4–1.5 dB/100 m at 10 MHz in all.
        skinOhmPerMRootHz: rng.logUniform(8e-6, 2.5e-5),
        tanDelta: rng.logUniform(1e-3, 6e-3),
      };
    }
  }
}

/** A different cable of the same family (a change of type along the route). */
export function drawOtherType(c: Cable, rng: Rng): Cable {
  for (let tries = 0; tries < 20; tries++) {
    const o = drawCable(c.kind, rng);
    const rho = Math.abs((o.z0Ohm - c.z0Ohm) / (o.z0Ohm + c.z0Ohm));
    if (rho > 0.04 && rho < 0.5) return { ...o, name: `${o.name} (spliced on)` };
  }
  const z = c.z0Ohm * rng.pick([0.8, 1.25]);
  return { ...c, z0Ohm: z, vf: c.vf * rng.uniform(0.95, 1.05), name: `${c.name} (other type)` };
}
