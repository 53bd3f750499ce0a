import { describe, expect, it } from 'vitest';
import { parseTraceCsv } from '../../../shared/trace';

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

  it('reads quoted fields through csv-parse', () => {
    const t = parseTraceCsv(['"time_ns","voltage_V"', ...col((i) => `"${i}","${i / 4}"`)].join('\n'));
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

  it('reads numbers exactly as JavaScript does', () => {
    const vals = ['0.1', '1e-9', '-2.5E+3', '123456789012345678', '.5', '7.', '0.000000000000000000001234', '+3'];
    const t = parseTraceCsv(['amplitude (V)', ...vals, ...Array(10).fill('0')].join('\n'), { sampleIntervalNs: 1 });
    vals.forEach((v, i) => expect(t.amplitude[i]).toBe(Number(v)));
  });
});
