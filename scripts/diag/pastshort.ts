/**
 * Tuning-set records (never the held-out ones) read as step records with a short: the levels the record
 * holds past the short, in launch heights against the pre-launch level, block by block. For telling a
 * wide pulse read as a step into a short from a genuine one. For developing the engine.
 *
 *   npx tsx scripts/diag/pastshort.ts [--no-loss]
 */
import { analyzeCsv } from '../../shared/trace';
import { parseTraceCsv } from '../../shared/trace/parse';
import { estimateSlowNoise, estimateNoise } from '../../shared/trace/noise';
import { findLaunch } from '../../shared/trace/launch';
import { sampleMedian } from '../../shared/trace/stats';
import { buildSet, type SetName } from '../sim2/sets';

const noLoss = process.argv.includes('--no-loss');
for (const set of ['tuning', 'tuning2', 'tuning3', 'tuning4']) {
  for (const c of buildSet(set as SetName)) {
    const po = (c.parseOptions ?? {}) as never;
    const a = analyzeCsv(c.csv, po, { vf: c.vf, z0Ohm: c.z0Ohm, loss: noLoss ? undefined : c.loss } as never);
    if (a.mode !== 'step') continue;
    const raw = (e: (typeof a.events)[number]) => e.reflectionCoefficientRaw ?? e.reflectionCoefficient;
    const s = a.events.find((e) => e.likelyMultipleOf === null && raw(e) <= -0.7);
    if (!s) continue;
    const tr = parseTraceCsv(c.csv, po);
    const y = tr.amplitude;
    const n = y.length;
    const dt = (tr.timeS[n - 1] - tr.timeS[0]) / (n - 1);
    const L = findLaunch({ y, t: tr.timeS, n, dt, unit: tr.amplitudeUnit } as never, 'auto', null, estimateSlowNoise(y));
    const from = Math.min(n - 1, s.index + Math.max(10, Math.round((3 * s.riseTimeNs * 1e-9) / dt)));
    const m = n - from;
    const blocks: number[] = [];
    for (let k = 0; k < 8 && m >= 16; k++) {
      const b0 = from + Math.floor((k * m) / 8);
      const b1 = from + Math.floor(((k + 1) * m) / 8);
      blocks.push((sampleMedian(y, b0, b1) - L.baseline) / L.height);
    }
    const sig = estimateNoise(y) / Math.abs(L.height);
    console.log(
      c.mode.padEnd(5),
      (noLoss ? 'nl ' : 'ls ') + c.id.slice(0, 40).padEnd(40),
      L.onsetInRecord ? 'in ' : 'pre',
      'raw',
      raw(s).toFixed(2),
      'at',
      s.distanceM.toFixed(1),
      'share',
      (m / n).toFixed(2),
      'sig',
      sig.toFixed(3),
      'min',
      Math.min(...blocks).toFixed(3),
      'blocks',
      blocks.map((v) => v.toFixed(2)).join(' '),
      '| exp',
      c.expected.map((e) => `${e.distanceM.toFixed(1)}(${e.rho.toFixed(2)})${e.required ? '' : '?'}`).join(' '),
    );
  }
}
