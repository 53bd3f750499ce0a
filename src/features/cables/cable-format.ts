import { delayNsPerFt, delayNsPerM } from '../../../shared/cable/derivations';
import { M_PER_FT } from '../../../shared/cable/propagation';
import {
  CONSTRUCTION_LABELS,
  LINE_CONSTANT_LABELS,
  parseAttenuationList,
  VF_SOURCE_LABELS,
  type AttenuationPoint,
  type Construction,
  type LineConstantField,
  type VfSource,
} from '../../../shared/schemas/cables';
import type { LengthUnit } from '../../lib/format';

export const formatVf = (vf: number | null | undefined, digits = 3) => (vf === null || vf === undefined || !Number.isFinite(vf) ? '—' : vf.toFixed(digits));

/** "±2.0 %" for a tolerance stored as a fraction of the VF. */
export const formatTolerance = (fraction: number) => `±${(fraction * 100).toFixed(1)} %`;

export const formatPercent = (fraction: number, digits = 1) => `${fraction >= 0 ? '+' : '−'}${Math.abs(fraction * 100).toFixed(digits)} %`;

/** "1 MHz: 1.3 dB · 10 MHz: 4.6 dB per 100 m", in the user's length unit. */
export function formatAttenuationPoints(points: readonly AttenuationPoint[], unit: LengthUnit): string {
  if (points.length === 0) return '—';
  const per = (db: number) => Number((unit === 'ft' ? db * M_PER_FT : db).toPrecision(3));
  return `${[...points]
    .sort((a, b) => a.frequencyMhz - b.frequencyMhz)
    .map((p) => `${p.frequencyMhz} MHz: ${per(p.dbPer100m)} dB`)
    .join(' · ')} per 100 ${unit}`;
}

export function formatDelay(vf: number, unit: LengthUnit): string {
  return unit === 'ft' ? `${delayNsPerFt(vf).toFixed(3)} ns/ft` : `${delayNsPerM(vf).toFixed(3)} ns/m`;
}

export const constructionLabel = (c: Construction) => CONSTRUCTION_LABELS[c] ?? c;
export const vfSourceLabel = (s: VfSource) => VF_SOURCE_LABELS[s] ?? s;

export const FIELD_LABELS: Record<string, string> = {
  name: 'Name',
  construction: 'Construction',
  dielectric: 'Dielectric',
  z0Ohm: 'Z0',
  vf: 'Velocity factor',
  vfTolerance: 'VF tolerance',
  attenuationDbPer100m: 'Attenuation',
  attenuationFreqMhz: 'Attenuation frequency',
  vfSource: 'VF source',
  vfReference: 'VF reference',
  notes: 'Notes',
  attenuation: 'Attenuation points',
  lossSource: 'Source of the loss figures',
  ...Object.fromEntries(Object.entries(LINE_CONSTANT_LABELS).map(([k, v]) => [k, v.label])),
  pulseVfs: 'VF per pulse width',
};

/** One history value as a person reads it. */
export function formatFieldValue(field: string, value: string | number | null, unit: LengthUnit): string {
  if (value === null || value === '') return '(none)';
  switch (field) {
    case 'z0Ohm':
      return `${value} Ω`;
    case 'vf':
      return formatVf(Number(value), 4);
    case 'vfTolerance':
      return formatTolerance(Number(value));
    case 'attenuationDbPer100m':
      return unit === 'ft' ? `${(Number(value) * M_PER_FT).toFixed(2)} dB/100 ft` : `${value} dB/100 m`;
    case 'attenuationFreqMhz':
      return `${value} MHz`;
    case 'attenuation': {
      // Stored as text per 100 m; shown in the user's unit.
      const read = parseAttenuationList(String(value));
      return read.ok ? formatAttenuationPoints(read.value, unit) : String(value);
    }
    case 'rDcOhmPerM':
    case 'skinOhmPerMRootHz':
    case 'lHPerM':
    case 'cFPerM':
    case 'gSPerM':
    case 'lossTangent': {
      const u = LINE_CONSTANT_LABELS[field as LineConstantField].unit;
      return u ? `${value} ${u}` : String(value);
    }
    case 'construction':
      return constructionLabel(value as Construction);
    case 'vfSource':
      return vfSourceLabel(value as VfSource);
    default:
      return String(value);
  }
}
