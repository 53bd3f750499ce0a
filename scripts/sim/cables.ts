/**
 * Demo cable models for the simulator. Values are typical of the cable
 * families, chosen from memory of manufacturers' datasheets (impedance,
 * velocity factor, DC loop resistance, attenuation at one frequency); they are
 * not any one product.
 */
import type { CableModel } from './line-model';

/** 50 Ω solid-PE coax, RG-58 class: about 16 dB/100 m at 100 MHz, 0.05 Ω/m loop. */
export const COAX_50: CableModel = {
  name: 'coax-50',
  z0Ohm: 50,
  vf: 0.66,
  rdcOhmPerM: 0.05,
  skinOhmPerMRootHz: 1.8e-4,
  tanDelta: 2e-4,
};

/** 75 Ω foam coax feeder: lower loss, faster. */
export const COAX_75: CableModel = {
  name: 'coax-75',
  z0Ohm: 75,
  vf: 0.82,
  rdcOhmPerM: 0.02,
  skinOhmPerMRootHz: 1.0e-4,
  tanDelta: 1e-4,
};

/** 0.5 mm PE-insulated telecom pair: ~100 Ω at high frequency, 0.18 Ω/m loop. */
export const PAIR_100: CableModel = {
  name: 'pair-100',
  z0Ohm: 100,
  vf: 0.67,
  rdcOhmPerM: 0.18,
  skinOhmPerMRootHz: 3.0e-4,
  tanDelta: 5e-4,
};

/** 12 kV XLPE single-core power cable, 240 mm² Al with Cu screen. */
export const POWER_MV: CableModel = {
  name: 'power-mv',
  z0Ohm: 30,
  vf: 0.56,
  rdcOhmPerM: 0.0006,
  skinOhmPerMRootHz: 1.4e-5,
  tanDelta: 3e-3,
};

/** Low-voltage 4-core power cable, core to core. */
export const POWER_LV: CableModel = {
  name: 'power-lv',
  z0Ohm: 40,
  vf: 0.6,
  rdcOhmPerM: 0.002,
  skinOhmPerMRootHz: 3e-5,
  tanDelta: 5e-3,
};

export const CABLES = { COAX_50, COAX_75, PAIR_100, POWER_MV, POWER_LV };

/** Same cable with scaled impedance and speed (water in the insulation lowers both). */
export function variant(cable: CableModel, zScale: number, vfScale: number, name: string): CableModel {
  return { ...cable, name, z0Ohm: cable.z0Ohm * zScale, vf: cable.vf * vfScale };
}

/** 0.4 mm PE-insulated telecom pair: higher loss than 0.5 mm, 0.27 Ω/m loop, about 120 Ω at high frequency. */
export const PAIR_04: CableModel = {
  name: 'pair-04',
  z0Ohm: 120,
  vf: 0.67,
  rdcOhmPerM: 0.27,
  skinOhmPerMRootHz: 4.2e-4,
  tanDelta: 5e-4,
};
