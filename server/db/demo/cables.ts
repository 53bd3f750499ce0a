import type { Transaction } from 'sequelize';
import { CableTypeInputSchema, type CableTypeInput } from '../../../shared/schemas/cables';
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
const FAMILIES: CableTypeInput[] = [
  {
    name: 'Solid PE coax, 50 Ω',
    construction: 'coax',
    dielectric: 'solid polyethylene',
    z0Ohm: 50,
    vf: 0.66,
    vfTolerance: 0.02,
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
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
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
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
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
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
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
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
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
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
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
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
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
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
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
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
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
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
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
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
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
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
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
    vfSource: 'handbook',
    vfReference: 'About 0.50–0.56 (from memory: no published source checked). Impregnated paper εr ≈ 3.3–4 would give 0.55–0.50.',
    notes: 'Generic family; old installations vary with moisture and age — calibrate.',
  },
];

/** The seeded names, for the sites and cable runs that refer to them. */
export const DEMO_CABLE_TYPE_NAMES: readonly string[] = FAMILIES.map((f) => f.name);

export const DEMO_CABLE_FAMILIES: readonly CableTypeInput[] = FAMILIES;

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
        changes: Object.entries(f).map(([field, to]) => ({ field, from: null, to: to ?? null })),
        changedById: null,
        calibrationId: null,
      },
      { transaction },
    );
    byName.set(c.name, c);
  }
  return byName;
}
