/**
 * Metadata lines before the numbers: split into a key and a value however they
 * are written (`key: value`, `key=value`, `key value`, or with `;`, `,` or a
 * tab between), and keys read by what they mean rather than by exact spelling,
 * so "NVP 67%", "velocity factor 0.56", "instrument velocity factor: 0.66" and
 * "v/2 = 84.0 m/µs" all give the instrument's velocity factor.
 */
import { M_PER_FT, SPEED_OF_LIGHT_M_PER_S } from '../cable/propagation';
import { shorten, TraceInputError } from './errors';
import type { TraceHints } from './reader-types';
import { distanceUnitScale, interpretColumn, MAX_NAME_CHARS, normaliseKey, splitQuantity, timeUnitScale } from './units';

export interface MetaEntry {
  key: string;
  value: string;
  line: number;
}

/** What the metadata says, converted to the units the reader works in. */
export interface MetaScan {
  hints: TraceHints;
  amplitudeUnit?: { unit: 'V' | 'rho'; scale: number };
  timeScale?: number;
  distanceUnit?: 'm' | 'ft';
}

export type MetaMeaning =
  | 'velocity-factor'
  | 'half-velocity'
  | 'sample-interval'
  | 'sample-rate'
  | 'start-time'
  | 'pulse-width'
  | 'impedance'
  | 'amplitude-unit'
  | 'time-unit'
  | 'distance-unit';

interface Meaning {
  id: MetaMeaning;
  /** Phrases that name the meaning wherever they stand in the key. */
  phrases: string[];
  /** Words that name it only when they are the whole key (after dropping FILLER). */
  whole: string[];
  /** Keys that contain these words mean something else. */
  unless?: RegExp;
}

/** Words that qualify a key without changing what it names ("instrument VF", "cable Z0"). */
const FILLER = new Set(['instrument', 'cable', 'nominal', 'the', 'set', 'setting', 'used', 'tdr', 'value', 'current', 'default']);
const NOT_A_SETTING = /(^| )(tolerance|uncertainty|error|accuracy|min|minimum|max|maximum|range|unit|units)( |$)/;

// Order matters: the first meaning that matches wins.
const MEANINGS: Meaning[] = [
  {
    id: 'half-velocity',
    phrases: ['v/2', 'vp/2', 'velocity/2', 'half velocity', 'half speed', 'half propagation velocity', 'half propagation speed'],
    whole: [],
    unless: NOT_A_SETTING,
  },
  {
    id: 'velocity-factor',
    phrases: [
      'velocity factor',
      'vf',
      'nvp',
      'vop',
      'velocity of propagation',
      'propagation velocity',
      'propagation speed',
      'speed of propagation',
      'propagation factor',
      'relative velocity',
    ],
    whole: ['velocity', 'vp', 'speed'],
    unless: NOT_A_SETTING,
  },
  {
    id: 'sample-rate',
    phrases: ['sample rate', 'sampling rate', 'sample frequency', 'sampling frequency', 'samples per second', 'acquisition rate'],
    whole: ['rate', 'fs'],
    unless: /(^| )units?( |$)/,
  },
  {
    id: 'sample-interval',
    phrases: [
      'sample interval',
      'sampling interval',
      'sample period',
      'sampling period',
      'sample spacing',
      'sample step',
      'time step',
      'timestep',
      'time increment',
      'x increment',
      'xincrement',
      'delta t',
      'time per sample',
      'time per point',
      'time resolution',
      'time interval',
      'horizontal interval',
      'horizontal resolution',
      'seconds per sample',
    ],
    whole: ['dt', 'interval', 'sample time', 'increment'],
    unless: /(^| )(div|division|divisions|trigger|units?)( |$)/,
  },
  {
    id: 'start-time',
    phrases: [
      'start time',
      'time offset',
      'x origin',
      'xorigin',
      'first sample time',
      'time of first sample',
      'trigger offset',
      'time zero',
      'start of record',
      'horizontal offset',
    ],
    whole: ['start', 't0', 'origin'],
    unless: /(^| )(date|clock|day|timestamp|units?)( |$)/,
  },
  {
    id: 'pulse-width',
    phrases: ['pulse width', 'pulse duration', 'pulse length', 'pulsewidth'],
    whole: ['pulse', 'pw'],
  },
  {
    id: 'impedance',
    phrases: ['characteristic impedance', 'cable impedance', 'line impedance', 'z0', 'zo'],
    whole: ['impedance', 'z'],
    unless: /(^| )(source|output|generator|termination|terminating|load|input|probe|port|driver|reference)( |$)/,
  },
  {
    id: 'time-unit',
    phrases: ['time unit', 'time units', 'x unit', 'x units', 'horizontal unit', 'horizontal units'],
    whole: [],
  },
  { id: 'distance-unit', phrases: ['distance unit', 'distance units', 'length unit', 'length units'], whole: [] },
  {
    id: 'amplitude-unit',
    phrases: ['amplitude unit', 'amplitude units', 'y unit', 'y units', 'vertical unit', 'vertical units'],
    whole: ['units', 'unit'],
  },
];

/** A speed unit written at the end of a key: "Propagation velocity (m/µs)", "v/2 m/us". */
const SPEED_IN_KEY = /[([]?\s*((?:k?m|ft)\s*\/\s*(?:s|ms|us|µs|μs|ns))\s*[)\]]?\s*$/i;

interface KeyReading {
  meaning: MetaMeaning | null;
  /** True when a specific phrase named it; false for a bare word such as "rate" or "Z". */
  specific: boolean;
  /** A unit written in the key itself, lower-case. */
  unit: string | null;
}

/** What a metadata key names, and any unit written in it. */
export function readKey(rawKey: string): KeyReading {
  if (rawKey.length > MAX_NAME_CHARS) return { meaning: null, specific: false, unit: null };
  let key = rawKey;
  let unit: string | null = null;
  const speed = SPEED_IN_KEY.exec(key);
  if (speed && speed.index > 0) {
    unit = speed[1].replace(/\s+/g, '').toLowerCase();
    key = key.slice(0, speed.index);
  }
  const normal = normaliseKey(key);
  unit ??= normal.unit;
  const words = normal.key.replace(/ ?\/ ?/g, '/');
  const spaced = ` ${words} `;
  const essential = words
    .split(' ')
    .filter((w) => !FILLER.has(w))
    .join(' ');
  for (const m of MEANINGS) {
    if (m.unless?.test(words)) continue;
    if (m.phrases.some((p) => spaced.includes(` ${p} `))) return { meaning: m.id, specific: true, unit };
    if (m.whole.includes(essential)) return { meaning: m.id, specific: false, unit };
  }
  return { meaning: null, specific: false, unit };
}

/** A number with or without a unit: `0.66`, `67%`, `84.0`, `2,5`. */
const QUANTITY_TOKEN = /^[+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?[^\s\d.,;:=+-]*$/;
const UNIT_TOKEN = /^[^\s\d.,;:=+-]\S*$/;
/** Longest metadata line searched for a key and a value written with blanks between. */
const MAX_KEY_VALUE_CHARS = 200;

function splitOnFirst(text: string, at: number): { key: string; value: string } | null {
  const key = text.slice(0, at).trim();
  return key === '' ? null : { key, value: text.slice(at + 1).trim() };
}

/** "velocity factor 0.56", "NVP 67 %", "v/2 84.0 m/µs": words, then a number and its unit. */
function splitWordsAndQuantity(words: string[]): { key: string; value: string } | null {
  const last = words[words.length - 1];
  if (words.length >= 2 && QUANTITY_TOKEN.test(last)) return { key: words.slice(0, -1).join(' '), value: last };
  const beforeLast = words[words.length - 2];
  if (words.length >= 3 && QUANTITY_TOKEN.test(beforeLast) && UNIT_TOKEN.test(last)) {
    return { key: words.slice(0, -2).join(' '), value: `${beforeLast} ${last}` };
  }
  return null;
}

/** A remark in brackets at the end of a line or value: "0.66 (instrument setting)", "99 (m/µs)". */
const TRAILING_REMARK = /^(.*\S)\s*[([]([^()[\]]*)[)\]]\s*$/;

/**
 * A value with a bracketed remark after its number: the remark is dropped
 * ("0.66 (instrument setting)" is 0.66), or taken as the unit when it is one
 * and the number has none ("66 (%)", "99 (m/µs)").
 */
export function valueWithoutRemark(value: string): string {
  const m = TRAILING_REMARK.exec(value);
  if (!m) return value;
  const q = splitQuantity(m[1]);
  if (!q) return value;
  const remark = m[2].trim();
  const asUnit = q.unit === null && remark !== '' ? splitQuantity(`1 ${remark}`) : null;
  return asUnit?.unit ? `${m[1]} ${remark}` : m[1];
}

/**
 * Split one metadata line into key and value: at the first `:` or `=`; else
 * between words and a trailing number (with its unit); else at the first tab,
 * `;` or `,`; else between a unit key and its unit ("units mV"). A bracketed
 * remark after the number ("VF 0.66 (instrument setting)") is set aside
 * first. Null for a line that is a note rather than a setting.
 */
export function splitMetaText(text: string): { key: string; value: string } | null {
  const remark = TRAILING_REMARK.exec(text);
  if (remark && !/[:=]/.test(text)) {
    const kv = splitMetaText(remark[1]);
    if (kv) return { key: kv.key, value: valueWithoutRemark(`${kv.value} (${remark[2]})`) };
  }
  const colon = text.search(/[:=]/);
  if (colon >= 0) return splitOnFirst(text, colon);
  const words = text.length <= MAX_KEY_VALUE_CHARS ? text.split(/\s+/) : [];
  // Separators other than decimal commas send the line to the delimiter rule below.
  const separated = /[\t;]|,(?!\d)|(?<!\d),/.test(text);
  if (words.length >= 2 && !separated) {
    const kv = splitWordsAndQuantity(words);
    if (kv) return kv;
  }
  for (const sep of ['\t', ';', ',']) {
    const at = text.indexOf(sep);
    if (at < 0) continue;
    const kv = splitOnFirst(text, at);
    if (!kv) return null;
    const value = kv.value
      .split(sep)
      .map((p) => p.trim())
      .filter((p) => p !== '')
      .join(' ');
    return { key: kv.key, value };
  }
  if (words.length === 2 || words.length === 3) {
    const key = words.slice(0, -1).join(' ');
    const { meaning } = readKey(key);
    if (meaning === 'amplitude-unit' || meaning === 'time-unit' || meaning === 'distance-unit') {
      return { key, value: words[words.length - 1] };
    }
  }
  return null;
}

/** One row of the head: a comment's text, or a row with its cells when the file's delimiter split it. */
export interface HeadText {
  text: string;
  line: number;
  cells: string[] | null;
}

/** Several settings on one line: "vf=0.66; z0=50; pulse=10 ns", each part a key and a value. */
function settingsOnOneLine(text: string): Array<{ key: string; value: string }> | null {
  if (!/[:=]/.test(text)) return null;
  for (const sep of [';', '\t', ',']) {
    if (!text.includes(sep)) continue;
    const parts = text
      .split(sep)
      .map((p) => p.trim())
      .filter((p) => p !== '');
    if (parts.length < 2 || !parts.every((p) => /^[^:=]+[:=]/.test(p))) continue;
    const kvs = parts.map((p) => splitOnFirst(p, p.search(/[:=]/)));
    if (kvs.every((kv) => kv !== null)) return kvs as Array<{ key: string; value: string }>;
  }
  return null;
}

/** Key/value entries from the head's rows; rows that are not settings are kept as numbered notes. */
export function metadataEntries(rows: HeadText[]): MetaEntry[] {
  const out: MetaEntry[] = [];
  let notes = 0;
  for (const r of rows) {
    if (r.text === '') continue;
    const several = settingsOnOneLine(r.text);
    if (several) {
      for (const kv of several) out.push({ ...kv, line: r.line });
      continue;
    }
    const cells = r.cells;
    let kv: { key: string; value: string } | null;
    if (cells && cells.length >= 2 && !/[:=]/.test(cells[0])) {
      kv = {
        key: cells[0],
        value: cells
          .slice(1)
          .filter((c) => c !== '')
          .join(' '),
      };
    } else kv = splitMetaText(r.text);
    out.push(
      kv
        ? { key: kv.key, value: valueWithoutRemark(kv.value), line: r.line }
        : { key: `note ${++notes}`, value: r.text, line: r.line },
    );
  }
  return out;
}

/** How one entry is read: a specific key that cannot be read is an error; a bare word ("rate") is skipped. */
interface Reading {
  entry: MetaEntry;
  strict: boolean;
  keyUnit: string | null;
}

function refuse(r: MetaEntry, expected: string, note = ''): TraceInputError {
  return new TraceInputError('BAD_METADATA', `metadata '${shorten(r.key)}' is '${shorten(r.value)}'${note}; ${expected}`, {
    line: r.line,
  });
}

/** A reading problem: an error for a specific key, nothing for a bare word. */
function unreadable(r: Reading, expected: string, note = ''): undefined {
  if (r.strict) throw refuse(r.entry, expected, note);
  return undefined;
}

/** Speeds a velocity can be written in, to metres per second. */
const SPEED_UNITS: Record<string, number> = {
  'm/s': 1,
  'km/s': 1e3,
  'm/ms': 1e3,
  'm/us': 1e6,
  'm/ns': 1e9,
  'ft/us': M_PER_FT * 1e6,
  'ft/ns': M_PER_FT * 1e9,
};
const PERCENT_UNITS = new Set(['%', 'percent', 'pct']);

function plainUnit(unit: string): string {
  return unit.toLowerCase().replace(/[µμ]/g, 'u');
}

/**
 * Velocity factor from a metadata entry: a fraction of c ("0.66", "0.66 c"),
 * a percent ("67%", or a bare number from 10 to 100), or a speed ("200 m/µs").
 * A half velocity (v/2, the way power-cable practice usually states speed, in
 * m/µs when no unit is given) is doubled. c is the SI value, exact by
 * definition of the metre, from shared/cable/propagation.
 */
function velocityFactor(r: Reading, half: boolean): number | undefined {
  const q = splitQuantity(r.entry.value);
  if (!q) return undefined;
  const written = q.unit ?? r.keyUnit;
  const unit = written !== null ? plainUnit(written) : half ? 'm/us' : null;
  let vf: number;
  if (unit === null) vf = q.number >= 10 && q.number <= 100 ? q.number / 100 : q.number;
  else if (PERCENT_UNITS.has(unit)) vf = q.number / 100;
  else if (unit === 'c') vf = q.number;
  else if (unit in SPEED_UNITS) vf = (q.number * SPEED_UNITS[unit]) / SPEED_OF_LIGHT_M_PER_S;
  else return unreadable(r, 'expected a velocity factor (0.66 or 66 %) or a speed in m/µs');
  if (half) vf *= 2;
  if (!(vf > 0 && vf <= 1)) {
    const note = unit !== null && unit in SPEED_UNITS ? `, a velocity factor of ${vf.toPrecision(3)}` : '';
    throw refuse(r.entry, 'expected a velocity factor between 0 and 1', note);
  }
  return vf;
}

/** A time in seconds; a bare number is taken as seconds only when it is small enough to be one. */
function timeSeconds(r: Reading, defaultUnit: string | null = null): number | undefined {
  const q = splitQuantity(r.entry.value);
  if (!q) return unreadable(r, `expected a time such as '0.5 ns'`);
  const unit = q.unit ?? r.keyUnit ?? defaultUnit;
  if (unit === null) {
    if (Math.abs(q.number) < 1e-3) return q.number;
    return unreadable(r, `expected a time such as '0.5 ns'`, ' with no unit');
  }
  const scale = timeUnitScale(unit);
  if (scale === undefined) return unreadable(r, 'expected a time in s, ms, us, ns or ps', ` with unit '${shorten(unit, 12)}'`);
  return q.number * scale;
}

const RATE_UNITS: Record<string, number> = {
  hz: 1,
  khz: 1e3,
  mhz: 1e6,
  ghz: 1e9,
  's/s': 1,
  'ks/s': 1e3,
  'ms/s': 1e6,
  'gs/s': 1e9,
  'sa/s': 1,
  'ksa/s': 1e3,
  'msa/s': 1e6,
  'gsa/s': 1e9,
  sps: 1,
  ksps: 1e3,
  msps: 1e6,
  gsps: 1e9,
};

/** Sample interval in ns from a sampling rate; a bare number of at least 1000 is taken as samples per second. */
function intervalFromRate(r: Reading): number | undefined {
  const q = splitQuantity(r.entry.value);
  if (!q) return undefined;
  const unit = (q.unit ?? r.keyUnit)?.toLowerCase() ?? null;
  let perSecond: number;
  if (unit === null && q.number >= 1e3) perSecond = q.number;
  else if (unit !== null && unit in RATE_UNITS) perSecond = q.number * RATE_UNITS[unit];
  else return unreadable(r, `expected a sampling rate such as '2 GS/s'`);
  if (!(perSecond > 0)) throw refuse(r.entry, 'expected a positive sampling rate');
  return 1e9 / perSecond;
}

function impedanceOhm(r: Reading): number | undefined {
  const q = splitQuantity(r.entry.value);
  if (!q || (q.unit !== null && !/^(ohms?|[ωΩ\u2126])$/i.test(q.unit))) return undefined;
  if (!(q.number > 0)) throw refuse(r.entry, 'expected a positive impedance in ohms');
  return q.number;
}

/** Read every entry whose key names a setting the reader or the engine uses. Impossible values are refused with their line. */
export function readMetadata(entries: MetaEntry[]): MetaScan {
  const out: MetaScan = { hints: {} };
  const hint = <K extends keyof TraceHints>(key: K, value: TraceHints[K] | undefined) => {
    if (value !== undefined) out.hints[key] = value;
  };
  for (const entry of entries) {
    const { meaning, specific, unit: keyUnit } = readKey(entry.key);
    const r: Reading = { entry, strict: specific, keyUnit };
    // Clock times ("start time: 10:32:05") and words ("pulse: auto") are not settings: only quantities are read.
    const quantity = splitQuantity(entry.value) !== null;
    switch (meaning) {
      case 'velocity-factor':
      case 'half-velocity':
        hint('instrumentVf', velocityFactor(r, meaning === 'half-velocity'));
        break;
      case 'sample-interval': {
        const s = timeSeconds(r);
        if (s !== undefined && !(s > 0)) throw refuse(entry, 'expected a positive sample interval');
        hint('sampleIntervalNs', s !== undefined ? s * 1e9 : undefined);
        break;
      }
      case 'sample-rate':
        hint('sampleIntervalNs', intervalFromRate(r));
        break;
      case 'start-time': {
        const s = quantity ? timeSeconds(r) : undefined;
        hint('startNs', s !== undefined ? s * 1e9 : undefined);
        break;
      }
      case 'pulse-width': {
        const s = quantity ? timeSeconds(r, 'ns') : undefined;
        hint('pulseWidthNs', s !== undefined ? s * 1e9 : undefined);
        break;
      }
      case 'impedance':
        hint('z0Ohm', impedanceOhm(r));
        break;
      case 'amplitude-unit': {
        const info = interpretColumn(`amplitude (${entry.value})`);
        if (info.amplitudeUnit && !info.unknownUnit) out.amplitudeUnit = { unit: info.amplitudeUnit, scale: info.scale };
        break;
      }
      case 'time-unit':
        out.timeScale = timeUnitScale(entry.value) ?? out.timeScale;
        break;
      case 'distance-unit':
        out.distanceUnit = distanceUnitScale(entry.value)?.unit ?? out.distanceUnit;
        break;
      case null:
        break;
    }
  }
  return out;
}
