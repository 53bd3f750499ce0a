/** Column-name and metadata-value interpretation: which column is which, and in what unit. */

export type ColumnRole = 'time' | 'distance' | 'amplitude' | 'index' | 'unknown';

export interface ColumnInfo {
  name: string;
  role: ColumnRole;
  /** Unit as written, lower-cased; null when the name gives none. */
  unit: string | null;
  /** Factor to SI (s, m, V) or to plain reflection coefficient. */
  scale: number;
  amplitudeUnit?: 'V' | 'rho';
  distanceUnit?: 'm' | 'ft';
  /** A unit was written but is not one the reader knows. */
  unknownUnit?: boolean;
}

const TIME_UNITS: Record<string, number> = {
  s: 1,
  sec: 1,
  secs: 1,
  second: 1,
  seconds: 1,
  ms: 1e-3,
  msec: 1e-3,
  us: 1e-6,
  µs: 1e-6,
  μs: 1e-6,
  usec: 1e-6,
  microseconds: 1e-6,
  ns: 1e-9,
  nsec: 1e-9,
  nanoseconds: 1e-9,
  ps: 1e-12,
  psec: 1e-12,
  picoseconds: 1e-12,
};

const DISTANCE_UNITS: Record<string, { scale: number; unit: 'm' | 'ft' }> = {
  m: { scale: 1, unit: 'm' },
  meter: { scale: 1, unit: 'm' },
  meters: { scale: 1, unit: 'm' },
  metre: { scale: 1, unit: 'm' },
  metres: { scale: 1, unit: 'm' },
  km: { scale: 1000, unit: 'm' },
  ft: { scale: 0.3048, unit: 'ft' },
  feet: { scale: 0.3048, unit: 'ft' },
  foot: { scale: 0.3048, unit: 'ft' },
};

const VOLT_UNITS: Record<string, number> = {
  v: 1,
  volt: 1,
  volts: 1,
  mv: 1e-3,
  millivolts: 1e-3,
  uv: 1e-6,
  µv: 1e-6,
  μv: 1e-6,
};

const RHO_UNITS: Record<string, number> = {
  rho: 1,
  ρ: 1,
  mrho: 1e-3,
  mρ: 1e-3,
  '%': 0.01,
  'units of rho': 1,
};

export const TIME_UNIT_NAMES = Object.keys(TIME_UNITS);

export function timeUnitScale(unit: string): number | undefined {
  return TIME_UNITS[unit.trim().toLowerCase()];
}

export function distanceUnitScale(unit: string): { scale: number; unit: 'm' | 'ft' } | undefined {
  return DISTANCE_UNITS[unit.trim().toLowerCase()];
}

/** Column titles and metadata keys longer than this are taken as plain text, never searched for a unit. */
export const MAX_NAME_CHARS = 120;

const RHO_NAME = /(^|[^a-z])(m?rho|m?ρ|refl(ection)?[ ._-]*coef(f(icient)?)?|reflection)([^a-z]|$)/;
const TIME_NAME = /(^|[^a-z])(t|time|zeit|temps|tiempo|delay|round[ _-]?trip)([^a-z]|$)/;
const DIST_NAME = /(^|[^a-z])(d|dist|distance|length|range|position|pos|location)([^a-z]|$)/;
const INDEX_NAME = /^(#|n|no|index|idx|sample|samples|sample[ _-]?(no|number|index)|point|pt|i)$/;

/** Split a header cell into its base name and its unit, e.g. `Time (s)`, `t [us]`, `time_ns`, `Time/ns`. */
export function splitNameAndUnit(raw: string): { base: string; unit: string | null } {
  const name = raw
    .trim()
    .replace(/^["']|["']$/g, '')
    .trim()
    .toLowerCase();
  // A name this long is not a column title with a unit; its patterns are not worth searching.
  if (name.length > MAX_NAME_CHARS) return { base: name, unit: null };
  const bracket = /^(.*?)\s*[([{]\s*([^)\]}]*?)\s*[)\]}]\s*$/.exec(name);
  if (bracket) return { base: bracket[1].trim(), unit: bracket[2].trim() || null };
  const sep = /^(.*?)\s*(?:[_/]|\s+|\bin\s+)\s*([a-zµμρ%]+)$/.exec(name);
  if (sep && sep[1] !== '') {
    const u = sep[2];
    if (u in TIME_UNITS || u in DISTANCE_UNITS || u in VOLT_UNITS || u in RHO_UNITS) {
      return { base: sep[1].replace(/\s+in$/, '').trim(), unit: u };
    }
  }
  return { base: name, unit: null };
}

/** Work out what a header cell names and how to convert its values. */
export function interpretColumn(raw: string): ColumnInfo {
  const { base, unit } = splitNameAndUnit(raw);
  const name = raw.trim();
  if (unit !== null) {
    const isRhoName = RHO_NAME.test(base);
    if (unit in TIME_UNITS) return { name, role: 'time', unit, scale: TIME_UNITS[unit] };
    if (unit in VOLT_UNITS) return { name, role: 'amplitude', unit, scale: VOLT_UNITS[unit], amplitudeUnit: 'V' };
    if (unit in RHO_UNITS && (unit !== '%' || isRhoName)) {
      return { name, role: 'amplitude', unit, scale: RHO_UNITS[unit], amplitudeUnit: 'rho' };
    }
    if (unit in DISTANCE_UNITS) {
      const d = DISTANCE_UNITS[unit];
      return { name, role: 'distance', unit, scale: d.scale, distanceUnit: d.unit };
    }
    if (unit === 'dimensionless' || unit === '-' || unit === 'unitless' || unit === '1') {
      if (isRhoName) return { name, role: 'amplitude', unit: null, scale: 1, amplitudeUnit: 'rho' };
    }
    const role: ColumnRole = TIME_NAME.test(base)
      ? 'time'
      : DIST_NAME.test(base)
        ? 'distance'
        : isRhoName || /volt|amp|signal|level|^v$|^y$|^ch/.test(base)
          ? 'amplitude'
          : 'unknown';
    return { name, role, unit, scale: 1, unknownUnit: true };
  }
  // A bare unit as the whole name ("rho", "mV", "ns", "ft").
  if (base in RHO_UNITS && base !== '%') {
    return { name, role: 'amplitude', unit: base, scale: RHO_UNITS[base], amplitudeUnit: 'rho' };
  }
  if (base in VOLT_UNITS) return { name, role: 'amplitude', unit: base, scale: VOLT_UNITS[base], amplitudeUnit: 'V' };
  if (base in TIME_UNITS && base !== 's') return { name, role: 'time', unit: base, scale: TIME_UNITS[base] };
  if (base === 'ft' || base === 'feet' || base === 'km') {
    const d = DISTANCE_UNITS[base];
    return { name, role: 'distance', unit: base, scale: d.scale, distanceUnit: d.unit };
  }
  if (RHO_NAME.test(base)) {
    const milli = /(^|[^a-z])m(rho|ρ)/.test(base);
    return { name, role: 'amplitude', unit: null, scale: milli ? 1e-3 : 1, amplitudeUnit: 'rho' };
  }
  if (INDEX_NAME.test(base)) return { name, role: 'index', unit: null, scale: 1 };
  if (TIME_NAME.test(base)) return { name, role: 'time', unit: null, scale: 1 };
  if (DIST_NAME.test(base)) return { name, role: 'distance', unit: null, scale: 1 };
  if (/volt|amp|signal|level|value|trace|^v$|^y$|^u$|^ch|channel|data|reading/.test(base)) {
    return { name, role: 'amplitude', unit: null, scale: 1, amplitudeUnit: 'V' };
  }
  return { name, role: 'unknown', unit: null, scale: 1 };
}

/** A number with an optional unit suffix, e.g. `0.5 ns`, `66 %`, `1e-9`, `0,66`. */
export function splitQuantity(value: string): { number: number; unit: string | null } | null {
  if (value.length > MAX_NAME_CHARS) return null;
  const m = /^\s*([+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?)\s*([a-zA-Zµμ%/Ωω\u2126]*)\s*$/.exec(value);
  if (!m) return null;
  const number = Number(m[1].replace(',', '.'));
  if (!Number.isFinite(number)) return null;
  return { number, unit: m[2] ? m[2].toLowerCase() : null };
}

/** Lower-case a metadata key, drop punctuation, and pull out a unit written in it (`Sample interval (ns)`). */
export function normaliseKey(key: string): { key: string; unit: string | null } {
  const { base, unit } = splitNameAndUnit(key);
  return {
    key: base
      .replace(/[^a-z0-9%/]+/g, ' ')
      .trim()
      .replace(/\s+/g, ' '),
    unit,
  };
}
