import type { Transaction } from 'sequelize';
import type { z } from 'zod';
import { CableTypeInputSchema, type AttenuationPoint } from '../../../shared/schemas/cables';
import { diffCable } from '../../cables/cables.service';
import type { AppContext } from '../../context';
import { CableType, CableTypeChange } from '../models';

/*
 * Generic dielectric families for the demo library, with the handbook range
 * behind each VF. No brands or products: a utility would add its own
 * datasheet entries beside these. The tolerance is the half-width of the
 * range as a fraction of the VF.
 *
 * Sources behind the references (named here; the text shown to users
 * says "published dielectric-constant tables" / "published coax data tables"):
 * - Standard Wire & Cable, "Formula for capacitance in 2-conductor, shielded,
 *   non-shielded wires, coax": dielectric constants and velocities of
 *   propagation (PE 2.26–2.29 → 66 %, TFE 2.1 → 69 %, PVC 3.6–5.0 → 53–45 %).
 * - P. Harden (NA5N), "Coaxial cable specifications" data sheet: VF 0.66 for
 *   solid PE, 0.78–0.84 for foamed PE, 0.70 for PTFE rows.
 * Where no published source was at hand, the reference says "from memory".
 */
type FamilyInput = z.input<typeof CableTypeInputSchema>;

const pt = (frequencyMhz: number, dbPer100m: number): AttenuationPoint => ({ frequencyMhz, dbPer100m });

/*
 * Loss figures. Generic families have no datasheet, so these are typical
 * values of each family's usual sizes, written from memory of makers' data
 * and marked so; the data-grade pair uses the usual 100 m cable limits of the
 * structured-cabling standards (from memory as well).
 */
const TYPICAL_COAX =
  'Typical of the family (5–10 mm sizes), from memory of makers\' datasheets; no one product. Replace with the installed cable\'s datasheet.';
const TYPICAL_PAIR = 'Typical of 0.4–0.6 mm pairs, from memory of telephone-cable data; no one product.';
const DATA_PAIR = 'The usual insertion-loss limits for 100 m of 100 Ω data cable in the structured-cabling standards, from memory.';
const TYPICAL_POWER =
  'Typical of 95–300 mm² cables, from memory of power-cable TDR and partial-discharge practice: the semiconducting screens make the loss rise steeply above 10 MHz.';

/**
 * 0.5 mm copper pair, worked out: R = 2·ρ/(π·0.25 mm²) with ρ = 1/58 Ω·mm²/m
 * (annealed copper, IEC 60028) = 0.176 Ω/m loop; k_s from the skin depth
 * δ = √(ρ/(π f μ0)): R_ac ≈ R_dc·r/(2δ), 3.4e-4 Ω/m/√Hz; L and C from
 * Z0 = 100 Ω and VF = 0.66 (L = Z0/v, C = 1/(Z0·v)); tanδ of PE from memory.
 */
const PE_PAIR_CONSTANTS = {
  rDcOhmPerM: 0.176,
  skinOhmPerMRootHz: 3.4e-4,
  lHPerM: 5.05e-7,
  cFPerM: 5.05e-11,
  gSPerM: 0,
  lossTangent: 3e-4,
  lossSource:
    'Calculated for 0.5 mm copper: R from copper resistivity (IEC 60028), the skin term from the skin depth, L and C from Z0 100 Ω and VF 0.66; PE loss tangent from memory.',
};

const FAMILIES: FamilyInput[] = [
  {
    name: 'Solid PE coax, 50 Ω',
    construction: 'coax',
    dielectric: 'solid polyethylene',
    z0Ohm: 50,
    vf: 0.66,
    vfTolerance: 0.02,
    attenuation: [pt(1, 1.3), pt(10, 4.6), pt(100, 16), pt(1000, 60)],
    lossSource: TYPICAL_COAX,
    vfSource: 'handbook',
    vfReference: 'Solid PE εr 2.25–2.3 → VF = 1/√εr ≈ 0.66 (published dielectric-constant tables: PE 2.26, 66 %); 0.66 on every solid-PE row of published coax data tables.',
    notes: 'Generic family. Replace with the datasheet value of the cable actually installed where known.',
  },
  {
    name: 'Solid PE coax, 75 Ω',
    construction: 'coax',
    dielectric: 'solid polyethylene',
    z0Ohm: 75,
    vf: 0.66,
    vfTolerance: 0.02,
    attenuation: [pt(1, 1.1), pt(10, 3.6), pt(100, 11), pt(1000, 40)],
    lossSource: TYPICAL_COAX,
    vfSource: 'handbook',
    vfReference: 'Solid PE εr 2.25–2.3 → VF ≈ 0.66 (published dielectric-constant tables); published coax data tables, 75 Ω solid-PE rows: 0.66.',
    notes: 'Generic family.',
  },
  {
    name: 'Foam PE coax, 75 Ω',
    construction: 'coax',
    dielectric: 'foamed (cellular) polyethylene',
    z0Ohm: 75,
    vf: 0.83,
    vfTolerance: 0.06,
    attenuation: [pt(1, 0.6), pt(10, 1.9), pt(100, 6.6), pt(1000, 22)],
    lossSource: TYPICAL_COAX,
    vfSource: 'handbook',
    vfReference:
      'Foamed PE VF 0.78–0.88 depending on the degree of foaming (published coax data tables foam rows 0.78–0.84; cellular PE εr 1.56 → 0.80 in published dielectric-constant tables). Wide range: calibrate on a known length.',
    notes: 'Generic family; the spread between makers is large, so a field calibration is worth more here than anywhere.',
  },
  {
    name: 'Foam PE coax, 50 Ω',
    construction: 'coax',
    dielectric: 'foamed (cellular) polyethylene',
    z0Ohm: 50,
    vf: 0.83,
    vfTolerance: 0.06,
    attenuation: [pt(10, 1.3), pt(100, 4), pt(1000, 13)],
    lossSource: TYPICAL_COAX,
    vfSource: 'handbook',
    vfReference: 'Foamed PE VF 0.78–0.88 (published coax data tables, 50 Ω foam rows 0.78–0.84).',
    notes: 'Generic family.',
  },
  {
    name: 'PTFE coax, 50 Ω',
    construction: 'coax',
    dielectric: 'solid PTFE',
    z0Ohm: 50,
    vf: 0.695,
    vfTolerance: 0.01,
    attenuation: [pt(10, 4.3), pt(100, 14), pt(1000, 50)],
    lossSource: TYPICAL_COAX,
    vfSource: 'handbook',
    vfReference: 'PTFE εr 2.1 → VF = 1/√2.1 ≈ 0.69 (published dielectric-constant tables: TFE 2.1, 69 %); published coax data tables PTFE row: 0.70.',
    notes: 'Generic family.',
  },
  {
    name: 'PVC-insulated pair',
    construction: 'twisted-pair',
    dielectric: 'PVC',
    z0Ohm: 100,
    vf: 0.525,
    vfTolerance: 0.15,
    attenuation: [pt(1, 2.5), pt(10, 9)],
    lossSource: TYPICAL_PAIR,
    vfSource: 'handbook',
    vfReference:
      'PVC εr 3.6–5.0 → 0.53–0.45 (published dielectric-constant tables); air between loosely laid pairs raises it towards 0.6 (common practice). Range 0.45–0.6.',
    notes: 'Generic family; Z0 varies with construction (roughly 80–120 Ω), so treat it as approximate.',
  },
  {
    name: 'PE-insulated telephone pair',
    construction: 'twisted-pair',
    dielectric: 'solid polyethylene, air core',
    z0Ohm: 100,
    vf: 0.66,
    vfTolerance: 0.03,
    ...PE_PAIR_CONSTANTS,
    vfSource: 'handbook',
    vfReference: 'Solid PE insulation εr ≈ 2.26 with an air core: ≈ 0.66 (published dielectric-constant tables for PE; the air-core figure from memory of TDR practice).',
    notes: 'Generic family; Z0 at TDR pulse frequencies is roughly 100–120 Ω.',
  },
  {
    name: 'Jelly-filled telephone pair',
    construction: 'twisted-pair',
    dielectric: 'solid polyethylene, petroleum-jelly filled core',
    z0Ohm: 100,
    vf: 0.64,
    vfTolerance: 0.03,
    attenuation: [pt(0.1, 0.6), pt(1, 1.8), pt(10, 6)],
    lossSource: TYPICAL_PAIR,
    vfSource: 'handbook',
    vfReference: 'The filling compound raises the effective εr of PE-insulated pairs a little: ≈ 0.62–0.66, 0.64 typical (from memory of TDR practice; no published table checked).',
    notes: 'Generic family.',
  },
  {
    name: 'Data-grade twisted pair, 100 Ω',
    construction: 'twisted-pair',
    dielectric: 'polyethylene or FEP',
    z0Ohm: 100,
    vf: 0.675,
    vfTolerance: 0.04,
    attenuation: [pt(1, 2), pt(10, 6.5), pt(100, 22)],
    lossSource: DATA_PAIR,
    vfSource: 'handbook',
    vfReference:
      'Nominal velocity of propagation of 100 Ω data cable is usually stated as 0.65–0.70 (common practice); PE 2.26 → 0.66, FEP 2.1 → 0.69 (published dielectric-constant tables).',
    notes: 'Generic family; the stated NVP of the actual cable is better.',
  },
  {
    name: 'Shielded XLPE MV cable',
    construction: 'shielded-power',
    dielectric: 'cross-linked polyethylene (XLPE) with semiconducting screens',
    z0Ohm: 30,
    vf: 0.58,
    vfTolerance: 0.15,
    attenuation: [pt(1, 0.15), pt(10, 1.5), pt(100, 10)],
    lossSource: TYPICAL_POWER,
    vfSource: 'handbook',
    vfReference:
      'XLPE εr ≈ 2.3 gives 0.66 in theory; the semiconducting conductor and insulation screens slow the pulse, and measured values run 0.5–0.67; 0.58 is the middle of that range (from memory of power-cable TDR practice).',
    notes: 'Generic family; Z0 of MV cable is roughly 20–50 Ω depending on conductor and insulation size. Calibrate on a known length before trusting distances.',
  },
  {
    name: 'Shielded EPR MV cable',
    construction: 'shielded-power',
    dielectric: 'ethylene propylene rubber (EPR) with semiconducting screens',
    z0Ohm: 25,
    vf: 0.55,
    vfTolerance: 0.12,
    attenuation: [pt(1, 0.2), pt(10, 2), pt(100, 14)],
    lossSource: TYPICAL_POWER,
    vfSource: 'handbook',
    vfReference: 'EPR εr ≈ 2.6–3.2 → 0.62–0.56 before the screens; measured 0.5–0.62, about 0.55 typical (from memory of power-cable TDR practice).',
    notes: 'Generic family; Z0 approximate.',
  },
  {
    name: 'Paper-insulated lead-covered cable',
    construction: 'shielded-power',
    dielectric: 'oil-impregnated paper, lead sheath',
    z0Ohm: 20,
    vf: 0.53,
    vfTolerance: 0.06,
    attenuation: [pt(1, 0.2), pt(10, 1.8)],
    lossSource: TYPICAL_POWER,
    vfSource: 'handbook',
    vfReference: 'About 0.50–0.56 (from memory: no published source checked). Impregnated paper εr ≈ 3.3–4 would give 0.55–0.50.',
    notes: 'Generic family; old installations vary with moisture and age — calibrate.',
  },
];

/** The seeded names, for the sites and cable runs that refer to them. */
export const DEMO_CABLE_TYPE_NAMES: readonly string[] = FAMILIES.map((f) => f.name);

export const DEMO_CABLE_FAMILIES: readonly FamilyInput[] = FAMILIES;

/** Adds the generic families with a history entry each; call before sites and runs, which look them up by name. */
export async function seedCableTypes(_ctx: AppContext, transaction?: Transaction): Promise<Map<string, CableType>> {
  const byName = new Map<string, CableType>();
  for (const family of FAMILIES) {
    const f = CableTypeInputSchema.parse(family);
    const c = await CableType.create({ ...f, revision: 1 }, { transaction });
    await CableTypeChange.create(
      {
        cableTypeId: c.id,
        revision: 1,
        kind: 'create',
        reason: 'Seeded with the generic dielectric families',
        changes: diffCable(null, f),
        changedById: null,
        calibrationId: null,
      },
      { transaction },
    );
    byName.set(c.name, c);
  }
  return byName;
}
