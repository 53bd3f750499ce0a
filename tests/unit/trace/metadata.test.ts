import { describe, expect, it } from 'vitest';
import { lineEnd } from '../../../shared/trace/lines';
import { metadataEntries, readKey, readMetadata, splitMetaText, type MetaEntry } from '../../../shared/trace/metadata';

// c = 299 792 458 m/s, exact by the SI definition of the metre (BIPM, SI Brochure, 9th ed.).
const C = 299_792_458;

describe('splitMetaText', () => {
  const cases: Array<[string, { key: string; value: string } | null]> = [
    ['velocity factor: 0.66', { key: 'velocity factor', value: '0.66' }],
    ['VF=0.7', { key: 'VF', value: '0.7' }],
    ['v/2 = 84.0 m/µs', { key: 'v/2', value: '84.0 m/µs' }],
    ['NVP 67%', { key: 'NVP', value: '67%' }],
    ['NVP 67 %', { key: 'NVP', value: '67 %' }],
    ['velocity factor 0,56', { key: 'velocity factor', value: '0,56' }],
    ['v/2 84.0 m/µs', { key: 'v/2', value: '84.0 m/µs' }],
    ['Sample rate 2,5 GS/s', { key: 'Sample rate', value: '2,5 GS/s' }],
    ['VF;0,66', { key: 'VF', value: '0,66' }],
    ['VF,0.66', { key: 'VF', value: '0.66' }],
    ['propagation velocity\t0.64', { key: 'propagation velocity', value: '0.64' }],
    ['Sample Interval,5e-10,s', { key: 'Sample Interval', value: '5e-10 s' }],
    ['units mV', { key: 'units', value: 'mV' }],
    ['recorded after rain', null],
    ['Cable VF 0.66 (instrument setting)', { key: 'Cable VF', value: '0.66' }],
    ['NVP 66 (%)', { key: 'NVP', value: '66 %' }],
    ['v/2 99 [m/µs]', { key: 'v/2', value: '99 m/µs' }],
    ['VF: 0.66 (instrument setting)', { key: 'VF', value: '0.66 (instrument setting)' }],
    ['note (after rain)', null],
  ];
  for (const [text, want] of cases) {
    it(`splits '${text}'`, () => expect(splitMetaText(text)).toEqual(want));
  }
});

describe('readKey', () => {
  const meanings: Array<[string, string | null]> = [
    ['NVP', 'velocity-factor'],
    ['Instrument velocity factor', 'velocity-factor'],
    ['Velocity of propagation (%)', 'velocity-factor'],
    ['Propagation velocity', 'velocity-factor'],
    ['Cable VF', 'velocity-factor'],
    ['velocity', 'velocity-factor'],
    ['v/2', 'half-velocity'],
    ['V / 2', 'half-velocity'],
    ['Half velocity', 'half-velocity'],
    ['VF tolerance', null],
    ['Velocity unit', null],
    ['Sampling interval (ps)', 'sample-interval'],
    ['Time per division', null],
    ['Sample rate', 'sample-rate'],
    ['Baud rate', null],
    ['Start time', 'start-time'],
    ['Start date', null],
    ['Pulse width', 'pulse-width'],
    ['Pulse amplitude', null],
    ['Z0', 'impedance'],
    ['Cable impedance', 'impedance'],
    ['Source impedance', null],
    ['Instrument output impedance', null],
    ['Y units', 'amplitude-unit'],
    ['Time units', 'time-unit'],
    ['Site', null],
  ];
  for (const [key, meaning] of meanings) {
    it(`reads '${key}' as ${meaning ?? 'no setting'}`, () => expect(readKey(key).meaning).toBe(meaning));
  }

  it('takes a speed unit written in the key', () => {
    expect(readKey('Propagation velocity m/us')).toMatchObject({ meaning: 'velocity-factor', unit: 'm/us' });
    expect(readKey('v/2 (m/µs)')).toMatchObject({ meaning: 'half-velocity', unit: 'm/µs' });
  });
});

describe('readMetadata', () => {
  const at = (key: string, value: string): MetaEntry[] => [{ key, value, line: 3 }];

  it('converts speeds to a velocity factor with the SI value of c', () => {
    // 200 m/µs ÷ c = 0.667128; 0.656 ft/ns = 0.19995 m/ns (international foot, 0.3048 m exact) ÷ c = 0.66697.
    expect(readMetadata(at('propagation velocity', '200 m/µs')).hints.instrumentVf).toBeCloseTo(200e6 / C, 14);
    expect(readMetadata(at('velocity', '0.656 ft/ns')).hints.instrumentVf).toBeCloseTo((0.656 * 0.3048e9) / C, 14);
    expect(readMetadata(at('v/2', '100 m/µs')).hints.instrumentVf).toBeCloseTo(200e6 / C, 14);
  });

  it('reads a value with a bracketed remark after it, and takes a bracketed unit', () => {
    const entries = metadataEntries([
      { text: 'VF: 0.66 (instrument setting)', line: 2, cells: null },
      { text: 'Sample interval = 0.5 (ns)', line: 3, cells: null },
      { text: 'Start time: 10:32:05 (local)', line: 4, cells: null },
    ]);
    expect(entries.map((e) => e.value)).toEqual(['0.66', '0.5 ns', '10:32:05 (local)']);
    const scan = readMetadata(entries);
    expect(scan.hints.instrumentVf).toBe(0.66);
    expect(scan.hints.sampleIntervalNs).toBeCloseTo(0.5, 12);
    expect(scan.hints.startNs).toBeUndefined();
  });

  it('refuses a velocity factor outside (0, 1] with the line', () => {
    expect(() => readMetadata(at('NVP', '101%'))).toThrow(expect.objectContaining({ code: 'BAD_METADATA', line: 3 }));
    expect(() => readMetadata(at('velocity factor', '0'))).toThrow(expect.objectContaining({ code: 'BAD_METADATA', line: 3 }));
    expect(() => readMetadata(at('VF', '2 furlongs'))).toThrow('expected a velocity factor (0.66 or 66 %) or a speed in m/µs');
  });

  it('skips what a bare word cannot say but refuses it under a specific key', () => {
    expect(readMetadata(at('rate', '10 pulses/s')).hints).toEqual({});
    expect(() => readMetadata(at('sample rate', '10 pulses/s'))).toThrow(expect.objectContaining({ code: 'BAD_METADATA' }));
    expect(readMetadata(at('interval', 'weekly')).hints).toEqual({});
    expect(() => readMetadata(at('sample interval', 'weekly'))).toThrow("metadata 'sample interval' is 'weekly'");
  });

  it('cuts a long key or value short in its message', () => {
    const err = (() => {
      try {
        readMetadata(at('sample interval', 'x'.repeat(5000)));
      } catch (e) {
        return e as Error;
      }
      return null;
    })();
    expect(err?.message).toBe(`line 3: metadata 'sample interval' is '${'x'.repeat(39)}…'; expected a time such as '0.5 ns'`);
  });
});

describe('lineEnd', () => {
  const bytes = (s: string) => new TextEncoder().encode(s);

  it('finds the end of a line within the limit and refuses one past it', () => {
    expect(lineEnd(bytes('abcd\nef'), 0, 4)).toBe(4);
    expect(lineEnd(bytes('abcd\r\nef'), 0, 4)).toBe(5); // the CR is not content
    expect(lineEnd(bytes('abcde\nef'), 0, 4)).toBe(-1);
    expect(lineEnd(bytes('abcd'), 0, 4)).toBe(4); // last line, no LF
    expect(lineEnd(bytes('abcde'), 0, 4)).toBe(-1);
    expect(lineEnd(bytes('ab\ncdefg'), 3, 4)).toBe(-1);
  });
});
