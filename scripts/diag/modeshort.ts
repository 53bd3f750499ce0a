/**
 * Records of the tuning sets (never the held-out ones) that the engine reads as pulse records: the
 * launch's width against the record, whether anything returns, and what a step reading of the same
 * record finds. For telling a step into a near short from a wide launch pulse. For developing the engine.
 *
 *   npx tsx scripts/diag/modeshort.ts [--no-loss]
 */
import { analyzeCsv } from '../../shared/trace';
import { parseTraceCsv } from '../../shared/trace/parse';
import { estimateSlowNoise } from '../../shared/trace/noise';
import { findLaunch } from '../../shared/trace/launch';
import { buildSet, type SetName } from '../sim2/sets';

const noLoss = process.argv.includes('--no-loss');
for (const set of ['tuning', 'tuning2', 'tuning3', 'tuning4']) {
  for (const c of buildSet(set as SetName)) {
    const po = (c.parseOptions ?? {}) as never;
    const opts = { vf: c.vf, z0Ohm: c.z0Ohm, loss: noLoss ? undefined : c.loss };
    const a = analyzeCsv(c.csv, po, opts as never);
    if (a.mode !== 'pulse') continue;
    const tr = parseTraceCsv(c.csv, po);
    const n = tr.amplitude.length;
    const dt = (tr.timeS[n - 1] - tr.timeS[0]) / (n - 1);
    const rec = { y: tr.amplitude, t: tr.timeS, n, dt, unit: tr.amplitudeUnit };
    const hint = tr.hints.pulseWidthNs !== undefined ? (tr.hints.pulseWidthNs * 1e-9) / dt : null;
    const L = findLaunch(rec as never, 'auto', hint, estimateSlowNoise(rec.y));
    const s = analyzeCsv(c.csv, po, { ...opts, mode: 'step' } as never);
    const first = s.events[0];
    const fmt = (x: typeof a) =>
      x.events.map((e) => `${e.distanceM.toFixed(1)}(${e.reflectionCoefficient.toFixed(2)})`).join(' ');
    console.log(
      c.mode.padEnd(5),
      c.id.slice(0, 44).padEnd(44),
      tr.amplitudeUnit.padEnd(3),
      L.onsetInRecord ? 'in ' : 'pre',
      'hint',
      hint === null ? '-' : hint.toFixed(0),
      'w',
      L.widthSamples,
      'wFrac',
      L.widthSamples !== null ? (L.widthSamples / (n - L.idx)).toFixed(3) : '-',
      'rise',
      L.riseSamples,
      'nEv',
      a.events.length,
      '| step:',
      fmt(s).slice(0, 60),
      first ? '' : '',
      '| exp',
      c.expected.map((e) => `${e.distanceM.toFixed(1)}${e.required ? '' : '?'}`).join(' '),
    );
  }
}
