/**
 * Rise and trailing-edge fall of the launch, for the tuning sets' records (never the held-out ones) that
 * are read as pulse records, with the simulated mode beside: whether a step record ended by a short just
 * past the launch can be told from a true launch pulse by its edges. For developing the engine.
 *
 *   npx tsx scripts/diag/fallrise.ts
 */
import { parseTraceCsv } from '../../shared/trace/parse';
import { estimateSlowNoise } from '../../shared/trace/noise';
import { findLaunch } from '../../shared/trace/launch';
import { boxcar } from '../../shared/trace/stats';
import { buildSet, type SetName } from '../sim2/sets';
for (const set of ['tuning', 'tuning2', 'tuning3', 'tuning4']) {
  for (const c of buildSet(set as SetName)) {
    const tr = parseTraceCsv(c.csv, (c.parseOptions ?? {}) as never);
    const n = tr.amplitude.length;
    const dt = (tr.timeS[n - 1] - tr.timeS[0]) / (n - 1);
    const rec = { y: tr.amplitude, t: tr.timeS, n, dt, unit: tr.amplitudeUnit };
    const L = findLaunch(
      rec as never,
      'auto',
      tr.hints.pulseWidthNs !== undefined ? (tr.hints.pulseWidthNs * 1e-9) / dt : null,
      estimateSlowNoise(rec.y),
    );
    if (L.mode !== 'pulse' || !L.found || L.widthSamples === null) continue;
    const y = boxcar(rec.y, Math.max(1, Math.round(L.riseSamples / 4)));
    const lvl = (f: number) => L.baseline + f * L.height;
    const s = L.sign >= 0 ? 1 : -1;
    // Trailing edge: from the peak onward, first below 90 % and first below 10 %.
    let pk = Math.max(0, Math.round(L.idx));
    for (let i = pk; i < Math.min(n, L.idx + L.widthSamples * 1.5); i++) if (s * y[i] > s * y[pk]) pk = i;
    let i90 = -1,
      i10 = -1;
    for (let i = Math.max(pk, Math.round(L.idx + 0.5 * L.widthSamples)); i < n; i++) {
      if (i90 < 0 && s * (y[i] - lvl(0.9 * s)) < 0) i90 = i;
      if (s * (y[i] - lvl(0.1 * s)) < 0) {
        i10 = i;
        break;
      }
    }
    const fall = i90 >= 0 && i10 >= 0 ? i10 - i90 : NaN;
    console.log(
      c.mode.padEnd(5),
      c.id.slice(0, 46).padEnd(46),
      'rise',
      String(L.riseSamples).padStart(5),
      'fall',
      String(fall).padStart(6),
      'ratio',
      (fall / Math.max(1, L.riseSamples)).toFixed(2).padStart(7),
      'width',
      L.widthSamples,
      L.onsetInRecord ? '' : 'no-onset',
    );
  }
}
