/**
 * Conductor resistance along a cable run, for the bridge and loop-resistance
 * methods.
 *
 * Resistance at temperature T from the value at 20 °C:
 *   R_T = R_20 · (1 + α20 · (T − 20 °C))
 * with α20 = 0.00393 /K for annealed copper (IEC 60028, the international
 * standard of resistance for copper) and α20 = 0.00403 /K for aluminium
 * (IEC 60889, hard-drawn aluminium wire for overhead line conductors). IEC 60228
 * Annex B writes the same correction as R_20 = R_T · 254.5/(234.5 + T) for copper
 * and R_20 = R_T · 248/(228 + T) for aluminium, i.e. α20 = 1/254.5 and 1/248.
 *
 * Sections of different size or material are compared through their
 * equivalent length: l_eq = l · r/r_ref, the length of the reference conductor
 * that has the same resistance (the usual way a loop test is worked out on a
 * route jointed from different cables).
 */
import { LocateInputError, finite, nonNegative, positive } from './errors';

export type ConductorMaterial = 'copper' | 'aluminium';
export const CONDUCTOR_MATERIALS: readonly ConductorMaterial[] = ['copper', 'aluminium'];

export interface MaterialData {
  /** Resistivity at 20 °C, Ω·m. */
  resistivity20OhmM: number;
  /** Temperature coefficient of resistance at 20 °C, 1/K. */
  alpha20PerK: number;
  source: string;
}

export const MATERIALS: Record<ConductorMaterial, MaterialData> = {
  copper: {
    resistivity20OhmM: 1e-6 / 58,
    alpha20PerK: 0.00393,
    source: 'IEC 60028: annealed copper, 1/58 Ω·mm²/m and α20 = 0.00393 /K at 20 °C',
  },
  aluminium: {
    resistivity20OhmM: 0.028264e-6,
    alpha20PerK: 0.00403,
    source: 'IEC 60889: hard-drawn aluminium, 0.028264 Ω·mm²/m and α20 = 0.00403 /K at 20 °C',
  },
};

/**
 * Largest DC resistance at 20 °C of class 2 (stranded) conductors, Ω/km,
 * IEC 60228 Table 2: plain copper and aluminium. Real conductors come in a few
 * per cent under these maxima.
 */
export const IEC60228_CLASS2_OHM_PER_KM: Record<ConductorMaterial, Record<number, number>> = {
  copper: {
    1.5: 12.1,
    2.5: 7.41,
    4: 4.61,
    6: 3.08,
    10: 1.83,
    16: 1.15,
    25: 0.727,
    35: 0.524,
    50: 0.387,
    70: 0.268,
    95: 0.193,
    120: 0.153,
    150: 0.124,
    185: 0.0991,
    240: 0.0754,
    300: 0.0601,
    400: 0.047,
    500: 0.0366,
    630: 0.0283,
  },
  aluminium: {
    16: 1.91,
    25: 1.2,
    35: 0.868,
    50: 0.641,
    70: 0.443,
    95: 0.32,
    120: 0.253,
    150: 0.206,
    185: 0.164,
    240: 0.125,
    300: 0.1,
    400: 0.0778,
    500: 0.0605,
    630: 0.0469,
  },
};

/** Relative standard uncertainties of conductor data when the caller gives none. */
export const CONDUCTOR_DATA_RELATIVE_U = {
  /** A value typed in from the cable's datasheet or the library. */
  given: 0.01,
  /** The IEC 60228 maximum: actual conductors sit a few per cent below it. */
  iec60228: 0.02,
  /** ρ/A from the nominal cross-section (stranding and compaction make real conductors differ). */
  nominal: 0.05,
} as const;

/** One stretch of one conductor along the route, listed from end A. */
export interface ConductorSection {
  lengthM: number;
  material: ConductorMaterial;
  /** Nominal cross-section, mm²; used with the IEC 60228 table or ρ/A when ohmPerM20 is not given. */
  sizeMm2?: number;
  /** Resistance per metre of this conductor at 20 °C, Ω/m (datasheet or library). */
  ohmPerM20?: number;
  /** Relative standard uncertainty of the resistance per metre; defaults by where the value came from. */
  relativeU?: number;
}

/** A section with its resistance per metre at 20 °C worked out. */
export interface ResolvedSection {
  lengthM: number;
  material: ConductorMaterial;
  ohmPerM20: number;
  relativeU: number;
  /** Same key ⇒ same conductor data, so the same error wherever it appears. */
  dataKey: string;
  dataLabel: string;
}

export function resolveSection(s: ConductorSection, field: string): ResolvedSection {
  const lengthM = positive(`${field}.lengthM`, s.lengthM, 'section length');
  if (!CONDUCTOR_MATERIALS.includes(s.material))
    throw new LocateInputError(
      'UNKNOWN_CONDUCTOR',
      `${field}.material`,
      `conductor material must be copper or aluminium, got '${String(s.material)}'`,
    );
  const material = s.material;
  let ohmPerM20: number;
  let relU: number;
  let dataKey: string;
  let dataLabel: string;
  if (s.ohmPerM20 !== undefined) {
    ohmPerM20 = positive(`${field}.ohmPerM20`, s.ohmPerM20, 'resistance per metre');
    relU = CONDUCTOR_DATA_RELATIVE_U.given;
    dataKey = `${material}-${(ohmPerM20 * 1000).toPrecision(6)}ohm-per-km`;
    dataLabel = `${material} conductor, ${(ohmPerM20 * 1000).toPrecision(4)} Ω/km given`;
  } else if (s.sizeMm2 !== undefined) {
    const size = positive(`${field}.sizeMm2`, s.sizeMm2, 'conductor size');
    const table = IEC60228_CLASS2_OHM_PER_KM[material][size];
    if (table !== undefined) {
      ohmPerM20 = table / 1000;
      relU = CONDUCTOR_DATA_RELATIVE_U.iec60228;
      dataLabel = `${size} mm² ${material}, IEC 60228 class 2 (${table} Ω/km)`;
    } else {
      ohmPerM20 = MATERIALS[material].resistivity20OhmM / (size * 1e-6);
      relU = CONDUCTOR_DATA_RELATIVE_U.nominal;
      dataLabel = `${size} mm² ${material}, ρ/A from the nominal size`;
    }
    dataKey = `${material}-${size}mm2`;
  } else {
    throw new LocateInputError(
      'MISSING',
      `${field}.sizeMm2`,
      'each conductor section needs its size (mm²) or its resistance per metre',
    );
  }
  if (s.relativeU !== undefined)
    relU = nonNegative(`${field}.relativeU`, s.relativeU, 'relative uncertainty of the conductor data');
  return { lengthM, material, ohmPerM20, relativeU: relU, dataKey, dataLabel };
}

/** Sections of one conductor, checked to add up to the installed length. */
export function resolveConductor(sections: ConductorSection[], installedLengthM: number, field: string): ResolvedSection[] {
  if (!Array.isArray(sections) || sections.length === 0)
    throw new LocateInputError('BAD_SECTIONS', field, 'give at least one conductor section (length, size and material)');
  const resolved = sections.map((s, i) => resolveSection(s, `${field}[${i}]`));
  const total = resolved.reduce((sum, s) => sum + s.lengthM, 0);
  if (Math.abs(total - installedLengthM) > 1e-6 * Math.max(1, installedLengthM))
    throw new LocateInputError(
      'BAD_SECTIONS',
      field,
      `the conductor sections add up to ${round(total)} m but the cable is ${round(installedLengthM)} m long`,
    );
  return resolved;
}

/** The same conductor made of uniform sections stretched to a (possibly perturbed) length. */
export function scaleSections(sections: ResolvedSection[], lengthM: number): ResolvedSection[] {
  const total = sections.reduce((sum, s) => sum + s.lengthM, 0);
  const k = lengthM / total;
  return sections.map((s) => ({ ...s, lengthM: s.lengthM * k }));
}

export function temperatureFactor(material: ConductorMaterial, temperatureC: number): number {
  return 1 + MATERIALS[material].alpha20PerK * (temperatureC - 20);
}

/** Multipliers on each conductor data set's resistance (1 = as given); the uncertainty propagation perturbs them. */
export type DataScale = Record<string, number>;

/** Resistance per metre of a section at a temperature. */
export function sectionOhmPerM(s: ResolvedSection, temperatureC: number, scale: DataScale = {}): number {
  return s.ohmPerM20 * (scale[s.dataKey] ?? 1) * temperatureFactor(s.material, temperatureC);
}

/** Equivalent length of a section in metres of the reference conductor: l · r/r_ref. */
export function equivalentLengthM(
  s: ResolvedSection,
  reference: ResolvedSection,
  temperatureC: number,
  scale: DataScale = {},
): number {
  return (s.lengthM * sectionOhmPerM(s, temperatureC, scale)) / sectionOhmPerM(reference, temperatureC, scale);
}

export function conductorOhm(sections: ResolvedSection[], temperatureC: number, scale: DataScale = {}): number {
  return sections.reduce((sum, s) => sum + s.lengthM * sectionOhmPerM(s, temperatureC, scale), 0);
}

/**
 * Walks along sections (listed from where the walk starts) until the
 * resistance `ohm` is used up; returns the distance walked, or null when the
 * sections run out first.
 */
export function distanceAtOhm(
  sections: ResolvedSection[],
  ohm: number,
  temperatureC: number,
  scale: DataScale = {},
): number | null {
  let left = ohm;
  let walked = 0;
  for (const s of sections) {
    const r = sectionOhmPerM(s, temperatureC, scale);
    const sectionOhm = s.lengthM * r;
    if (left <= sectionOhm) return walked + left / r;
    left -= sectionOhm;
    walked += s.lengthM;
  }
  return left <= 1e-12 * ohm ? walked : null;
}

/** Sections as seen from the given end (they are listed from end A). */
export function fromEnd<T>(sections: T[], end: 'A' | 'B'): T[] {
  return end === 'A' ? sections : [...sections].reverse();
}

export function temperatureInput(field: string, temperatureC: number | undefined, temperatureUK: number | undefined) {
  const t = temperatureC === undefined ? 20 : finite(`${field}.temperatureC`, temperatureC, 'conductor temperature');
  if (t < -50 || t > 250)
    throw new LocateInputError(
      'OUT_OF_RANGE',
      `${field}.temperatureC`,
      `conductor temperature must be between −50 and 250 °C, got ${t}`,
    );
  const u =
    temperatureUK !== undefined
      ? nonNegative(`${field}.temperatureUK`, temperatureUK, 'uncertainty of the conductor temperature')
      : temperatureC === undefined
        ? DEFAULT_UNKNOWN_TEMPERATURE_U_K
        : DEFAULT_TEMPERATURE_U_K;
  return { temperatureC: t, temperatureUK: u };
}

/** Standard uncertainty of a conductor temperature that was given without one, K. */
export const DEFAULT_TEMPERATURE_U_K = 2;
/** When no temperature is given, 20 °C is assumed with this standard uncertainty, K. */
export const DEFAULT_UNKNOWN_TEMPERATURE_U_K = 8;

function round(x: number) {
  return Math.round(x * 100) / 100;
}
