import { describe, expect, it } from 'vitest';
import { likelyColumn } from '../../../server/cables/cables.csv';

describe('the library column a header cell most likely meant', () => {
  it('is the one that starts with it or holds it as a word', () => {
    expect(likelyColumn('z0')).toBe('z0_ohm');
    expect(likelyColumn('Tolerance')).toBe('vf_tolerance');
    expect(likelyColumn('loss tangent')).toBe('loss_tangent');
  });

  it('is the one a typo or two away', () => {
    expect(likelyColumn('vf_sorce')).toBe('vf_source');
    expect(likelyColumn('dielectirc')).toBe('dielectric');
  });

  it('is none when nothing is near or the word names several columns', () => {
    expect(likelyColumn('colour')).toBeNull();
    expect(likelyColumn('extra1')).toBeNull();
    expect(likelyColumn('x')).toBeNull();
    // "attenuation" starts three columns (attenuation_db_per_100m, attenuation_freq_mhz, attenuation_points).
    expect(likelyColumn('attenuation')).toBeNull();
  });
});
