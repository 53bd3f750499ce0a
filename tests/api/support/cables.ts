/**
 * Cable library bodies and CSV rows the API tests send.
 * Solid PE coax: VF and εr from the Standard Wire & Cable dielectric table (εr 2.26, VP 66 %).
 * Foamed PE coax: VF 0.82 ± 0.03, a handbook range for foam PE (common practice, from memory).
 */

/** A valid `POST /api/cables` body for a 50 Ω solid PE coax named `name`, with `extra` laid over it. */
export const solidPeCoax = (name: string, extra: object = {}) => ({
  name,
  construction: 'coax',
  dielectric: 'solid polyethylene',
  z0Ohm: 50,
  vf: 0.66,
  vfTolerance: 0.02,
  vfSource: 'handbook',
  vfReference: 'Standard Wire & Cable dielectric table: PE 2.26 → VP 66 %',
  ...extra,
});

/**
 * A valid `POST /api/cables` body for a 100 Ω solid PE telephone pair named `name` (VF 0.66 ± 0.03, a handbook
 * range for PE-insulated pairs: common practice, from memory), with `extra` laid over it.
 */
export const solidPePair = (name: string, extra: object = {}) => ({
  name,
  construction: 'twisted-pair',
  dielectric: 'solid polyethylene',
  z0Ohm: 100,
  vf: 0.66,
  vfTolerance: 0.03,
  vfSource: 'handbook',
  vfReference: 'PE-insulated telephone pair, handbook range',
  ...extra,
});

/** The cable library import's full header, every column it reads. */
export const LIBRARY_CSV_HEADER =
  'name,construction,dielectric,z0_ohm,vf,vf_tolerance,attenuation_db_per_100m,attenuation_freq_mhz,vf_source,vf_reference,notes';

/** One import row under LIBRARY_CSV_HEADER: a 75 Ω foamed PE coax named `name`. */
export const foamPeRow = (name: string) =>
  `${name},coax,foamed polyethylene,75,0.82,0.03,,,handbook,Foam PE coax handbook range,`;
