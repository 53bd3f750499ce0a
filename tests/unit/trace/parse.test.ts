import { describe, expect, it } from 'vitest';
import {
  MAX_COLUMNS,
  MAX_DATA_LINE_BYTES,
  MAX_HEADER_LINE_BYTES,
  MAX_MESSAGE_CHARS,
  parseTraceCsv,
  TraceInputError,
} from '../../../shared/trace';
import { readBody } from '../../../shared/trace/numeric-rows';

const N = 20;
const col = (f: (i: number) => string) => Array.from({ length: N }, (_, i) => f(i));

describe('parseTraceCsv layouts', () => {
  it('reads time_ns,voltage_mV', () => {
    const t = parseTraceCsv(['time_ns,voltage_mV', ...col((i) => `${i * 0.5},${i * 10}`)].join('\n'));
    expect(t.layout.kind).toBe('time-amplitude');
    expect(t.timeS[3]).toBeCloseTo(1.5e-9, 20); // 1.5 ns
    expect(t.amplitude[3]).toBeCloseTo(0.03, 15); // 30 mV = 0.03 V
    expect(t.amplitudeUnit).toBe('V');
  });

  it('reads Time (s),Amplitude (V) with # key: value metadata, CRLF and trailing blank lines', () => {
    const text =
      [
        '# velocity factor: 0.69',
        '# pulse width: 10 ns',
        '# impedance: 75 ohm',
        'Time (s),Amplitude (V)',
        ...col((i) => `${i}e-9,${i / 100}`),
      ].join('\r\n') + '\r\n\r\n\r\n';
    const t = parseTraceCsv(text);
    expect(t.metadata['velocity factor']).toBe('0.69');
    expect(t.hints).toEqual({ instrumentVf: 0.69, pulseWidthNs: 10, z0Ohm: 75 });
    expect(t.timeS.length).toBe(N);
    expect(t.timeS[19]).toBeCloseTo(19e-9, 20);
    expect(t.layout.headerLine).toBe(4);
    expect(t.layout.lastDataLine).toBe(24);
  });

  it('reads t [us];v [V] with decimal commas and a UTF-8 BOM', () => {
    const text =
      '\ufeff' +
      ['t [us];v [V]', ...col((i) => `${(i * 0.001).toFixed(3).replace('.', ',')};${(i / 8).toString().replace('.', ',')}`)].join(
        '\n',
      );
    const t = parseTraceCsv(text);
    expect(t.layout.delimiter).toBe(';');
    expect(t.layout.decimalComma).toBe(true);
    expect(t.timeS[2]).toBeCloseTo(2e-9, 20); // 0,002 µs = 2 ns
    expect(t.amplitude[3]).toBe(0.375);
  });

  it('reads time (ps), rho as a reflection coefficient', () => {
    const t = parseTraceCsv(['time (ps), rho', ...col((i) => `${i * 25}, ${i > 10 ? 0.2 : 0}`)].join('\n'));
    expect(t.amplitudeUnit).toBe('rho');
    expect(t.timeS[4]).toBeCloseTo(100e-12, 22); // 100 ps
    expect(t.amplitude[15]).toBe(0.2);
  });

  it('reads milli-rho and tab-separated files', () => {
    const t = parseTraceCsv(['time_ns\tmrho', ...col((i) => `${i}\t${i * 5}`)].join('\n'));
    expect(t.layout.delimiter).toBe('tab');
    expect(t.amplitudeUnit).toBe('rho');
    expect(t.amplitude[4]).toBeCloseTo(0.02, 15); // 20 mρ
  });

  it('reads a single amplitude column with the sample interval and start in the metadata', () => {
    const t = parseTraceCsv(
      ['# sample interval: 250 ps', '# start time: -5 ns', 'amplitude (mV)', ...col((i) => `${i}`)].join('\n'),
    );
    expect(t.layout.kind).toBe('amplitude-only');
    expect(t.timeS[0]).toBeCloseTo(-5e-9, 20);
    expect(t.timeS[4]).toBeCloseTo(-4e-9, 20); // −5 ns + 4 · 0.25 ns
    expect(t.amplitude[7]).toBeCloseTo(0.007, 15);
  });

  it('takes the sample interval from the caller when the file has none', () => {
    const t = parseTraceCsv(col((i) => `${i / 10}`).join('\n'), { sampleIntervalNs: 2, startNs: 10 });
    expect(t.timeS[5]).toBeCloseTo(20e-9, 20);
  });

  it('reads key,value preamble rows and a distance column in metres, converting back with the instrument VF', () => {
    const text = ['Instrument,demo', 'Velocity factor,0.5', 'Distance (m),Level (V)', ...col((i) => `${i * 10},${i}`)].join('\n');
    const t = parseTraceCsv(text);
    expect(t.layout.kind).toBe('distance-amplitude');
    expect(t.metadata.Instrument).toBe('demo');
    expect(t.instrumentVf).toBe(0.5);
    expect(t.sourceDistanceUnit).toBe('m');
    // 10 m at VF 0.5: t = 2·10/(0.5·c) = 133.4256 ns (c exact, SI).
    expect(t.timeS[1]).toBeCloseTo(133.4256e-9, 13);
  });

  it('reads a distance column in feet with NVP in percent', () => {
    const text = ['# nvp: 66%', 'distance_ft,voltage_V', ...col((i) => `${i * 100},${i}`)].join('\n');
    const t = parseTraceCsv(text);
    expect(t.instrumentVf).toBeCloseTo(0.66, 12);
    expect(t.sourceDistanceUnit).toBe('ft');
    // 100 ft = 30.48 m at VF 0.66: t = 2·30.48/(0.66·c) = 308.09 ns.
    expect(t.timeS[1]).toBeCloseTo(308.0919e-9, 12);
  });

  it('lets the caller give the instrument VF for a distance column', () => {
    const t = parseTraceCsv(['distance (m),v (V)', ...col((i) => `${i},${i}`)].join('\n'), { instrumentVf: 1 });
    expect(t.timeS[3]).toBeCloseTo((2 * 3) / 299_792_458, 20);
  });

  it('reads a names row followed by a units row', () => {
    const t = parseTraceCsv(
      ['Time;Signal', 'ms;mV', ...col((i) => `${(i * 1e-6).toExponential().replace('.', ',')};${i}`)].join('\n'),
    );
    expect(t.layout.columns).toEqual(['Time (ms)', 'Signal (mV)']);
    expect(t.timeS[3]).toBeCloseTo(3e-9, 20); // 3e-6 ms
    expect(t.amplitude[3]).toBeCloseTo(0.003, 15);
  });

  it('reads quoted numbers in the byte reader, exactly as csv-parse does', () => {
    const text = ['"time_ns","voltage_V"', ...col((i) => `"${i}","${i / 4}"`)].join('\n');
    const t = parseTraceCsv(text);
    expect(t.layout.reader).toBe('fast');
    expect(t.amplitude[2]).toBe(0.5);
    const general = parseTraceCsv(text, { reader: 'csv-parse' });
    expect(general.layout.reader).toBe('csv-parse');
    expect({ ...general, layout: { ...general.layout, reader: 'fast' } }).toEqual(t);
  });

  it('reads quoted fields with blanks inside the quotes through csv-parse', () => {
    const t = parseTraceCsv(['"time_ns","voltage_V"', ...col((i) => `" ${i}", "${i / 4} "`)].join('\n'));
    expect(t.layout.reader).toBe('csv-parse');
    expect(t.amplitude[2]).toBe(0.5);
  });

  it('reads blank-separated columns', () => {
    const t = parseTraceCsv(['time_ns voltage_V', ...col((i) => `${i}   ${i / 2}`)].join('\n'));
    expect(t.layout.delimiter).toBe('whitespace');
    expect(t.amplitude[3]).toBe(1.5);
  });

  it('picks the amplitude column by name and warns about the rest', () => {
    const t = parseTraceCsv(['index,time_ns,ch1 (V),ch2 (V)', ...col((i) => `${i},${i},${i * 2},${i * 3}`)].join('\n'));
    expect(t.amplitude[2]).toBe(4);
    expect(t.warnings.map((w) => w.code)).toContain('EXTRA_COLUMNS');
  });

  it('puts unevenly spaced samples on a uniform grid', () => {
    const times = col((i) => `${i === 7 ? 7.6 : i}`);
    const t = parseTraceCsv(['time_ns,voltage_V', ...times.map((x) => `${x},${x}`)].join('\n'));
    expect(t.layout.resampled).toBe(true);
    expect(t.timeS[7]).toBeCloseTo(7e-9, 20);
    // Linear interpolation between (6, 6) and (7.6, 7.6) at 7 gives 7.
    expect(t.amplitude[7]).toBeCloseTo(7, 12);
  });

  it('gives the same trace from the fast reader and from csv-parse', () => {
    const text = [
      '# velocity factor: 0.66',
      'time_ns,voltage_mV',
      ...Array.from({ length: 500 }, (_, i) => `${(i * 0.123456789).toPrecision(12)},${Math.sin(i) * 1e3}`),
    ].join('\n');
    const a = parseTraceCsv(text);
    const b = parseTraceCsv(text, { reader: 'csv-parse' });
    expect(a.layout.reader).toBe('fast');
    expect(b.layout.reader).toBe('csv-parse');
    expect(Array.from(a.timeS)).toEqual(Array.from(b.timeS));
    expect(Array.from(a.amplitude)).toEqual(Array.from(b.amplitude));
  });

  it('goes on with csv-parse from the first row the fast reader declines, with the same result', () => {
    const lines = [
      'time_ns;voltage_mV',
      ...Array.from({ length: 500 }, (_, i) => `${i * 0.25};${(Math.cos(i) * 100).toFixed(4)}`),
    ];
    lines.splice(300, 0, '# a note in the middle', '');
    lines[401] = `" ${398 * 0.25}";" ${(Math.cos(398) * 100).toFixed(4)}"`; // sample 398, blanks inside quotes
    const text = lines.join('\r\n');
    const mixed = parseTraceCsv(text);
    const general = parseTraceCsv(text, { reader: 'csv-parse' });
    expect(mixed.layout.reader).toBe('csv-parse');
    expect(mixed).toEqual(general);
    expect(mixed.timeS.length).toBe(500);
    expect(mixed.amplitude[398]).toBeCloseTo(Math.cos(398) / 10, 7); // mV to V
    expect(mixed.layout.lastDataLine).toBe(503);
  });

  it('grows its arrays when the row estimate is short, in both readers', () => {
    const text = ['time_ns,voltage_V', ...Array.from({ length: 100 }, (_, i) => `${i},${i / 2}`)].join('\n');
    const bytes = new TextEncoder().encode(text);
    for (const general of [false, true]) {
      const body = readBody(
        {
          bytes,
          start: 'time_ns,voltage_V\n'.length,
          firstLine: 2,
          delimiter: ',',
          decimalComma: false,
          columnCount: 2,
          keep: [1, 0],
          columnNames: ['time_ns', 'voltage_V'],
          rowEstimate: 3,
        },
        general,
      );
      expect(body.rows).toBe(100);
      expect(body.lastRowLine).toBe(101);
      expect(Array.from(body.columns[0])).toEqual(Array.from({ length: 100 }, (_, i) => i / 2));
      expect(Array.from(body.columns[1])).toEqual(Array.from({ length: 100 }, (_, i) => i));
    }
  });

  it('reads numbers exactly as JavaScript does', () => {
    const vals = ['0.1', '1e-9', '-2.5E+3', '123456789012345678', '.5', '7.', '0.000000000000000000001234', '+3'];
    const t = parseTraceCsv(['amplitude (V)', ...vals, ...Array(10).fill('0')].join('\n'), { sampleIntervalNs: 1 });
    vals.forEach((v, i) => expect(t.amplitude[i]).toBe(Number(v)));
  });
});

// c = 299 792 458 m/s, exact by the SI definition of the metre (BIPM, SI Brochure, 9th ed.).
const C = 299_792_458;
const rows = (n = N) => Array.from({ length: n }, (_, i) => `${i * 10},${i / 100}`);
const distanceFile = (meta: string[]) => [...meta, 'distance (m),level (V)', ...rows()].join('\n');

describe('parseTraceCsv velocity factor written in any of the usual ways', () => {
  const cases: Array<[string, number, string]> = [
    // [metadata line, expected VF, where the expected value comes from]
    ['NVP 67%', 0.67, '67 % of c'],
    ['# NVP 67%', 0.67, '67 % of c, as a comment'],
    ['velocity factor 0.56', 0.56, 'a fraction of c'],
    ['instrument velocity factor: 0.66', 0.66, 'a fraction of c'],
    ['Velocity Factor = 0.7', 0.7, 'a fraction of c'],
    ['VF;0.69', 0.69, 'a fraction of c, semicolon between'],
    ['VF\t0.64', 0.64, 'a fraction of c, tab between'],
    ['# VF, 0.61', 0.61, 'a fraction of c, comma between'],
    ['NVP,67,%', 0.67, 'percent in its own cell'],
    ['velocity of propagation: 69 %', 0.69, 'percent with a blank'],
    ['Propagation velocity = 0.8c', 0.8, 'a fraction written with c'],
    ['Cable VF (%) 82', 0.82, 'percent named in the key'],
    // Half velocity, the usual way power-cable practice states speed: VF = 2·v/2 ÷ c.
    ['v/2 = 84.0 m/µs', (2 * 84.0e6) / C, '2 · 84.0 m/µs ÷ c = 0.56039'],
    ['# V/2: 84 m/us', (2 * 84e6) / C, 'ASCII micro sign'],
    ['half velocity (m/µs) 80', (2 * 80e6) / C, 'unit in the key: 2 · 80 m/µs ÷ c = 0.53370'],
    ['v/2 84', (2 * 84e6) / C, 'v/2 without a unit is in m/µs (common practice)'],
    ['Propagation velocity (m/us): 200', 200e6 / C, 'full speed: 200 m/µs ÷ c = 0.66713'],
    ['Cable VF 0.66 (instrument setting)', 0.66, 'a remark in brackets after the value'],
    ['# NVP: 67 (%)', 0.67, 'the unit in brackets after the value'],
    ['v/2 84 (m/µs)', (2 * 84e6) / C, 'the speed unit in brackets after the value'],
  ];
  for (const [line, vf, why] of cases) {
    it(`reads '${line}' (${why})`, () => {
      const t = parseTraceCsv(distanceFile([line]));
      expect(t.hints.instrumentVf).toBeCloseTo(vf, 12);
      expect(t.instrumentVf).toBeCloseTo(vf, 12);
      // 10 m at that VF: t = 2·10 / (VF·c).
      expect(t.timeS[1]).toBeCloseTo((2 * 10) / (vf * C), 18);
    });
  }

  it('reads the half velocity at its published worked value: v/2 = 84.0 m/µs is VF 0.5604', () => {
    // 2 · 84.0e6 / 299 792 458 = 0.560388 (hand-worked from the SI value of c).
    expect(parseTraceCsv(distanceFile(['v/2 = 84.0 m/µs'])).instrumentVf).toBeCloseTo(0.5604, 4);
  });

  it('reads the setting in a semicolon file with decimal commas', () => {
    const t = parseTraceCsv(
      ['Velocity factor;0,66', 'distance (m);level (V)', ...rows().map((r) => r.replace(',', ';'))].join('\n'),
    );
    expect(t.instrumentVf).toBeCloseTo(0.66, 12);
  });

  it('does not take a tolerance, a source impedance or a clock time for a setting', () => {
    const t = parseTraceCsv(
      distanceFile([
        'VF tolerance: 0.02',
        'velocity factor 0.6',
        'source impedance: 25 ohm',
        'Z0 = 75 Ω',
        'start time: 10:32:05',
        'pulse: auto',
      ]),
    );
    expect(t.hints).toEqual({ instrumentVf: 0.6, z0Ohm: 75 });
  });

  const impossible: Array<[string, string]> = [
    ['NVP 0%', 'expected a velocity factor between 0 and 1'],
    ['velocity factor 1.5', 'expected a velocity factor between 0 and 1'],
    ['v/2 = 160 m/µs', 'a velocity factor of 1.07'], // 2 · 160e6 / c = 1.067
    ['VF: -0.6', 'expected a velocity factor between 0 and 1'],
  ];
  for (const [line, words] of impossible) {
    it(`refuses '${line}' with its line number`, () => {
      const text = distanceFile(['# site: north feeder', line]);
      expect(() => parseTraceCsv(text)).toThrow(expect.objectContaining({ code: 'BAD_METADATA', line: 2 }));
      expect(() => parseTraceCsv(text)).toThrow(words);
    });
  }
});

describe('parseTraceCsv other settings written in any of the usual ways', () => {
  const single = (meta: string[]) => [...meta, 'amplitude (V)', ...Array.from({ length: N }, (_, i) => `${i / 10}`)].join('\n');

  const intervals: Array<[string, number]> = [
    ['sample interval 0.5 ns', 0.5],
    ['Sample interval (ns): 0,5', 0.5],
    ['# dt = 500 ps', 0.5],
    ['Sampling period;2.5e-10;s', 0.25],
    ['time per point\t1 ns', 1],
    ['Sample rate = 2 GS/s', 0.5], // 1 / 2e9 s = 0.5 ns
    ['sampling rate: 4 GHz', 0.25], // 1 / 4e9 s = 0.25 ns
    ['# Sample rate 1e9', 1], // a bare rate is in samples per second
  ];
  for (const [line, dtNs] of intervals) {
    it(`reads '${line}' as a ${dtNs} ns interval`, () => {
      const t = parseTraceCsv(single([line]));
      expect(t.hints.sampleIntervalNs).toBeCloseTo(dtNs, 12);
      expect(t.timeS[4] - t.timeS[0]).toBeCloseTo(4 * dtNs * 1e-9, 20);
    });
  }

  it('reads start, pulse width, impedance and amplitude unit without colons', () => {
    const t = parseTraceCsv(single(['sample interval 1 ns', 'start time -5 ns', 'pulse width 10ns', 'Z0 = 75 ohm', 'units mV']));
    expect(t.hints).toEqual({ sampleIntervalNs: 1, startNs: -5, pulseWidthNs: 10, z0Ohm: 75 });
    expect(t.timeS[0]).toBeCloseTo(-5e-9, 20);
    // The column names V, so the metadata's mV does not rescale it.
    expect(t.amplitude[3]).toBeCloseTo(0.3, 15);
  });

  it('takes the amplitude unit from the metadata when the column names none', () => {
    const t = parseTraceCsv(
      ['units: mV', 'sample interval: 1 ns', 'signal', ...Array.from({ length: N }, (_, i) => `${i}`)].join('\n'),
    );
    expect(t.amplitude[7]).toBeCloseTo(0.007, 15); // 7 mV
  });

  it('keeps every line of the head in the metadata record', () => {
    const t = parseTraceCsv(single(['Instrument;demo unit', 'sample interval 1 ns', 'recorded after rain']));
    expect(t.metadata).toEqual({ Instrument: 'demo unit', 'sample interval': '1 ns', 'note 1': 'recorded after rain' });
  });

  it('reads several settings written on one line', () => {
    const t = parseTraceCsv(distanceFile(['vf=0.660; z0=50; pulse=10 ns']));
    expect(t.hints).toEqual({ instrumentVf: 0.66, z0Ohm: 50, pulseWidthNs: 10 });
    const u = parseTraceCsv(distanceFile(['# Z0: 75 ohm, NVP: 82%']));
    expect(u.hints).toEqual({ z0Ohm: 75, instrumentVf: 0.82 });
  });

  it('refuses an impossible impedance or an unreadable rate with the line', () => {
    expect(() => parseTraceCsv(single(['sample interval 1 ns', 'Z0 = -50 ohm']))).toThrow(
      expect.objectContaining({ code: 'BAD_METADATA', line: 2 }),
    );
    expect(() => parseTraceCsv(single(['Sample rate: 2 furlongs']))).toThrow(
      expect.objectContaining({ code: 'BAD_METADATA', line: 1 }),
    );
  });
});

describe('parseTraceCsv multi-channel oscilloscope files', () => {
  const scope = (header: string[], n = N) =>
    [...header, ...Array.from({ length: n }, (_, i) => `${i}e-9,${i},${10 * i},${100 * i}`)].join('\n');

  it('reads the first channel by default and says so', () => {
    const t = parseTraceCsv(scope(['Time (s),CH1 (V),CH2 (V),CH3 (V)']));
    expect(t.channel).toEqual({ name: 'CH1 (V)', index: 1, available: ['CH1 (V)', 'CH2 (V)', 'CH3 (V)'] });
    expect(t.layout.amplitudeColumn).toBe('CH1 (V)');
    expect(t.amplitude[5]).toBe(5);
    expect(t.timeS[5]).toBeCloseTo(5e-9, 20);
    expect(t.warnings.map((w) => w.code)).toEqual(['EXTRA_COLUMNS']);
  });

  it('chooses a channel by name, with or without its unit, in any case', () => {
    for (const channel of ['CH2', 'ch2', 'CH2 (V)', 'ch 2']) {
      const t = parseTraceCsv(scope(['Time (s),CH1 (V),CH2 (V),CH3 (V)']), { channel });
      expect(t.channel?.name).toBe('CH2 (V)');
      expect(t.amplitude[5]).toBe(50);
    }
  });

  it('chooses a channel by its 1-based number, given as a number or as text', () => {
    expect(parseTraceCsv(scope(['Time (s),CH1 (V),CH2 (V),CH3 (V)']), { channel: 3 }).amplitude[5]).toBe(500);
    const t = parseTraceCsv(scope(['Time (s),CH1 (V),CH2 (V),CH3 (V)']), { channel: '3' });
    expect(t.channel).toMatchObject({ name: 'CH3 (V)', index: 3 });
  });

  it('reads TIME,CH1,CH2,CH3 with seconds assumed for small bare times', () => {
    const t = parseTraceCsv(scope(['TIME,CH1,CH2,CH3']), { channel: 'CH3' });
    expect(t.amplitude[2]).toBe(200);
    expect(t.timeS[2]).toBeCloseTo(2e-9, 20);
    expect(t.warnings.map((w) => w.code)).toEqual(['EXTRA_COLUMNS', 'TIME_UNIT_ASSUMED']);
  });

  it('reads a units row under the names row, bracketed or not', () => {
    const a = parseTraceCsv(scope(['TIME,CH1,CH2,CH3', 's,mV,mV,mV']), { channel: 2 });
    expect(a.layout.columns).toEqual(['TIME (s)', 'CH1 (mV)', 'CH2 (mV)', 'CH3 (mV)']);
    expect(a.amplitude[4]).toBeCloseTo(0.04, 15); // 40 mV
    const b = parseTraceCsv(scope(['# a scope export', 'Time,Ch1,Ch2,Ch3', '(s),(V),(V),(V)']), { channel: 'ch3' });
    expect(b.channel?.name).toBe('Ch3 (V)');
    expect(b.layout.headerLine).toBe(2);
    expect(b.amplitude[4]).toBe(400);
  });

  it('names the columns of a file without a header by position', () => {
    const t = parseTraceCsv(scope([]), { channel: 2 });
    expect(t.channel).toEqual({ name: 'column 3', index: 2, available: ['column 2', 'column 3', 'column 4'] });
    expect(t.amplitude[3]).toBe(30);
  });

  it('refuses a channel the file does not have, naming those it has', () => {
    for (const channel of ['CH4', 4, 0]) {
      let err: unknown;
      try {
        parseTraceCsv(scope(['Time (s),CH1 (V),CH2 (V),CH3 (V)']), { channel });
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(TraceInputError);
      expect(err).toMatchObject({ code: 'UNKNOWN_CHANNEL', line: 1, field: 'channel' });
      expect((err as Error).message).toContain(
        `channel '${channel}' is not in the file; its channels are 1 'CH1 (V)', 2 'CH2 (V)', 3 'CH3 (V)'`,
      );
    }
    expect(() => parseTraceCsv(scope(['Time (s),CH1 (V),CH2 (V),CH3 (V)']), { channel: 1.5 })).toThrow(
      expect.objectContaining({ code: 'BAD_OPTION', field: 'channel' }),
    );
  });

  it('says which column was read in a two-column file', () => {
    const t = parseTraceCsv(['time_ns,voltage_mV', ...col((i) => `${i},${i}`)].join('\n'));
    expect(t.channel).toEqual({ name: 'voltage_mV', index: 1, available: ['voltage_mV'] });
  });
});

describe('parseTraceCsv from bytes', () => {
  const files: Record<string, string> = {
    'time and amplitude with metadata, CRLF': [
      '# velocity factor: 0.69',
      'Time (s),Amplitude (V)',
      ...col((i) => `${i}e-9,${i / 100}`),
    ].join('\r\n'),
    'BOM, semicolons and decimal commas':
      '\ufeff' + ['t [us];v [V]', ...col((i) => `${(i * 0.001).toFixed(3)};${i / 8}`.replace(/\./g, ','))].join('\n'),
    'quoted fields through csv-parse': ['"time_ns","voltage_V"', ...col((i) => `"${i}","${i / 4}"`)].join('\n'),
    'distance in feet with NVP': ['# nvp: 66%', 'distance_ft,voltage_V', ...col((i) => `${i * 100},${i}`)].join('\n'),
    'blank-separated with a µs unit': ['time (µs) voltage (mV)', ...col((i) => `${i / 1000}   ${i * 3}`)].join('\n'),
    'three channels': ['Time (s),CH1 (V),CH2 (V),CH3 (V)', ...col((i) => `${i}e-9,${i},${-i},${2 * i}`)].join('\n'),
    'numbers JavaScript reads exactly': [
      'amplitude (V)',
      '123456789012345678',
      '0.000000000000000000001234',
      '-2.5E+3',
      '.5',
      '7.',
      ...Array(12).fill('1e300'),
    ].join('\n'),
  };
  for (const [name, text] of Object.entries(files)) {
    it(`gives the same trace from text and from bytes: ${name}`, () => {
      const options = { sampleIntervalNs: 1, channel: 1 };
      const fromText = parseTraceCsv(text, options);
      const fromBytes = parseTraceCsv(new TextEncoder().encode(text), options);
      const fromBuffer = parseTraceCsv(Buffer.from(text, 'utf8'), options);
      expect(fromBytes).toEqual(fromText);
      expect(fromBuffer).toEqual(fromText);
      expect(Array.from(fromBytes.amplitude)).toEqual(Array.from(fromText.amplitude));
      expect(Array.from(fromBytes.timeS)).toEqual(Array.from(fromText.timeS));
    });
  }

  it('reads numbers from bytes exactly as JavaScript does', () => {
    const vals = [
      '0.1',
      '1e-9',
      '-2.5E+3',
      '123456789012345678',
      '.5',
      '7.',
      '0.000000000000000000001234',
      '+3',
      '9007199254740993',
    ];
    const t = parseTraceCsv(new TextEncoder().encode(['amplitude (V)', ...vals, ...Array(10).fill('0')].join('\n')), {
      sampleIntervalNs: 1,
    });
    expect(t.layout.reader).toBe('fast');
    vals.forEach((v, i) => expect(t.amplitude[i]).toBe(Number(v)));
  });

  it('reads a Windows-1252 header (µ as one byte) and UTF-16 text with a byte-order mark', () => {
    const latin = Uint8Array.from(
      [...'time (', 0xb5, ...'s),voltage (V)\n'].map((c) => (typeof c === 'number' ? c : c.charCodeAt(0))),
    );
    const body = new TextEncoder().encode(col((i) => `${i},${i}`).join('\n'));
    const t = parseTraceCsv(Uint8Array.from([...latin, ...body]));
    expect(t.layout.xUnit).toBe('µs');
    expect(t.timeS[3]).toBeCloseTo(3e-6, 18);
    const text = ['time_ns,voltage_V', ...col((i) => `${i},${i / 2}`)].join('\n');
    const utf16 = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(text, 'utf16le')]);
    expect(parseTraceCsv(utf16)).toEqual(parseTraceCsv(text));
    // Saved without the mark, in either byte order: every other byte is NUL, the rest ASCII text.
    const bare = Buffer.from(text, 'utf16le');
    expect(parseTraceCsv(bare)).toEqual(parseTraceCsv(text));
    const swapped = Buffer.from(bare);
    swapped.swap16();
    expect(parseTraceCsv(swapped)).toEqual(parseTraceCsv(text));
    // A NUL in text that is not UTF-16 is still refused as binary.
    expect(() => parseTraceCsv(Buffer.concat([Buffer.from('time_ns,v\n0,1\n1'), Buffer.from([0]), Buffer.from(',2\n')]))).toThrow(
      /not text/,
    );
  });
});

describe('parseTraceCsv bounds on hostile files', () => {
  it('refuses a header that names more or fewer columns than the rows of numbers have, at the header line', () => {
    const wide = ['# sample interval: 1 ns', 'time (ns),voltage (V),note', ...col((i) => `${i},${i * 0.01}`)].join('\n');
    for (const input of [Buffer.from(wide), wide]) {
      expect(() => parseTraceCsv(input)).toThrow(
        expect.objectContaining({
          code: 'HEADER_MISMATCH',
          line: 2,
          message:
            "line 2: the header names 3 columns ('time (ns)', 'voltage (V)', 'note') but the rows of numbers below it have 2; give one name per column",
        }),
      );
    }
    const narrow = ['time (ns);voltage (V)', ...col((i) => `${i};${i * 0.01};${i * 0.02}`)].join('\n');
    expect(() => parseTraceCsv(narrow)).toThrow(expect.objectContaining({ code: 'HEADER_MISMATCH', line: 1 }));
    // A trailing delimiter on every row, or on the header alone, is not a missing column.
    const t = parseTraceCsv(['time (ns),voltage (V),', ...col((i) => `${i},${i * 0.01}`)].join('\n'));
    expect(t.amplitude[4]).toBeCloseTo(0.04, 12);
  });

  it('names the first line that starts with a number but has words beside its numbers (units in every cell)', () => {
    const text = ['# sample interval: 1 ns', 'time,voltage', ...col((i) => `${i}.0 ns,${(i * 0.01).toFixed(3)} V`)].join('\n');
    for (const input of [Buffer.from(text), text]) {
      expect(() => parseTraceCsv(input)).toThrow(
        expect.objectContaining({
          code: 'NO_NUMERIC_ROWS',
          line: 3,
          message:
            'line 3: "0.0 ns,0.000 V" starts with a number but has words beside its numbers: give every cell as a plain number and put the units in the header (no rows of numbers were found)',
        }),
      );
    }
    // A head of words only still says just that no numbers were found.
    expect(() => parseTraceCsv('time,voltage\nnone,recorded\n')).toThrow(
      expect.objectContaining({
        code: 'NO_NUMERIC_ROWS',
        message: 'no rows of numbers were found; expected numeric rows after the header',
      }),
    );
  });

  it('refuses a 19.5 MB single-cell line at its line, with a short message, from bytes and from text', () => {
    const cell = '7'.repeat(19_500_000);
    const text = `time_ns,voltage_V\n${cell}\n${col((i) => `${i},${i}`).join('\n')}`;
    for (const input of [Buffer.from(text), text]) {
      let err: TraceInputError | undefined;
      try {
        parseTraceCsv(input);
      } catch (e) {
        err = e as TraceInputError;
      }
      expect(err?.code).toBe('LINE_TOO_LONG');
      expect(err?.line).toBe(2);
      expect(err?.message.length).toBeLessThanOrEqual(MAX_MESSAGE_CHARS);
      expect(err?.message).toContain(`longer than ${MAX_DATA_LINE_BYTES} bytes`);
    }
  });

  it('refuses an overlong line deep in the body with both readers', () => {
    const lines = ['time_ns,voltage_V', ...Array.from({ length: 600 }, (_, i) => `${i},${i}`)];
    lines[500] = `500,${'1'.repeat(MAX_DATA_LINE_BYTES)}`;
    for (const reader of ['auto', 'csv-parse'] as const) {
      expect(() => parseTraceCsv(lines.join('\n'), { reader })).toThrow(
        expect.objectContaining({ code: 'LINE_TOO_LONG', line: 501 }),
      );
    }
    // One byte shorter is a number the reader accepts (and finds out of range, so says so).
    lines[500] = `500,${'1'.repeat(MAX_DATA_LINE_BYTES - 4)}`;
    expect(() => parseTraceCsv(lines.join('\n'))).toThrow(expect.objectContaining({ code: 'NOT_FINITE', line: 501 }));
  });

  it('refuses a header line over its own limit, and more columns than the limit', () => {
    const long = `# ${'x'.repeat(MAX_HEADER_LINE_BYTES)}\ntime_ns,voltage_V\n${col((i) => `${i},${i}`).join('\n')}`;
    expect(() => parseTraceCsv(long)).toThrow(expect.objectContaining({ code: 'LINE_TOO_LONG', line: 1 }));
    const wide = Array.from({ length: 20 }, (_, r) => Array.from({ length: MAX_COLUMNS + 1 }, (_, k) => r + k).join(',')).join(
      '\n',
    );
    expect(() => parseTraceCsv(wide)).toThrow(expect.objectContaining({ code: 'TOO_MANY_COLUMNS', line: 1 }));
  });

  it('cuts a long offending value short in the message', () => {
    const bad = 'x'.repeat(3000);
    const text = ['time_ns,voltage_V', ...col((i) => (i === 9 ? `9,${bad}` : `${i},${i}`))].join('\n');
    for (const reader of ['auto', 'csv-parse'] as const) {
      let err: TraceInputError | undefined;
      try {
        parseTraceCsv(text, { reader });
      } catch (e) {
        err = e as TraceInputError;
      }
      expect(err?.code).toBe('NOT_A_NUMBER');
      expect(err?.line).toBe(11);
      expect(err?.message).toBe(`line 11: '${'x'.repeat(39)}…' in column 'voltage_V' is not a number`);
    }
  });

  it('reads a row of 64 columns, the most allowed', () => {
    const header = ['time_ns', ...Array.from({ length: MAX_COLUMNS - 1 }, (_, k) => `ch${k + 1} (V)`)].join(',');
    const data = col((i) => [i, ...Array.from({ length: MAX_COLUMNS - 1 }, (_, k) => i * k)].join(','));
    const t = parseTraceCsv([header, ...data].join('\n'), { channel: 'ch63' });
    expect(t.channel?.available.length).toBe(63);
    expect(t.amplitude[2]).toBe(2 * 62);
  });
});
