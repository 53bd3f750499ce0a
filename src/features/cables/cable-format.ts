import { delayNsPerFt, delayNsPerM } from '../../../shared/cable/derivations';
import { M_PER_FT } from '../../../shared/cable/propagation';
import { CONSTRUCTION_LABELS, VF_SOURCE_LABELS, type Construction, type VfSource } from '../../../shared/schemas/cables';
import type { LengthUnit } from '../../lib/format';

export const formatVf = (vf: number | null | undefined, digits = 3) => (vf === null || vf === undefined || !Number.isFinite(vf) ? '—' : vf.toFixed(digits));

/** "±2.0 %" for a tolerance stored as a fraction of the VF. */
export const formatTolerance = (fraction: number) => `±${(fraction * 100).toFixed(1)} %`;

export const formatPercent = (fraction: number, digits = 1) => `${fraction >= 0 ? '+' : '−'}${Math.abs(fraction * 100).toFixed(digits)} %`;

/** dB per 100 m or per 100 ft, as the user reads lengths. */
export function formatAttenuation(dbPer100m: number | null, freqMhz: number | null, unit: LengthUnit): string {
  if (dbPer100m === null || freqMhz === null) return '—';
  const v = unit === 'ft' ? dbPer100m * M_PER_FT : dbPer100m;
  return `${v.toFixed(2)} dB/100 ${unit} at ${freqMhz} MHz`;
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
    case 'construction':
      return constructionLabel(value as Construction);
    case 'vfSource':
      return vfSourceLabel(value as VfSource);
    default:
      return String(value);
  }
}
