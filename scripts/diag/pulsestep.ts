/**
 * One tuning case read in both modes: the record's opening and closing levels, the launch as found,
 * and what the step and pulse readings report. For telling pulse records read as steps. Never held-out sets.
 *
 *   npx tsx scripts/diag/pulsestep.ts tuning2 tuning2-071 [--no-loss]
 */
import { analyzeCsv } from '../../shared/trace';
import { parseTraceCsv } from '../../shared/trace/parse';
import { estimateSlowNoise, estimateNoise } from '../../shared/trace/noise';
import { findLaunch } from '../../shared/trace/launch';
import { buildSet, type SetName } from '../sim2/sets';

const [setName, id] = process.argv.slice(2);
if (!setName?.startsWith('tuning')) throw new Error('tuning sets only');
const noLoss = process.argv.includes('--no-loss');
const c = buildSet(setName as SetName).find((x) => x.id.includes(id))!;
const po = (c.parseOptions ?? {}) as never;
const tr = parseTraceCsv(c.csv, po);
const y = tr.amplitude;
const n = y.length;
const dt = (tr.timeS[n - 1] - tr.timeS[0]) / (n - 1);
const rec = { y, t: tr.timeS, n, dt, unit: tr.amplitudeUnit };
console.log(
  c.id,
  'mode',
  c.mode,
  'unit',
  tr.amplitudeUnit,
  'n',
  n,
  't0',
  tr.timeS[0],
  'dt',
  dt,
  'hints',
  JSON.stringify(tr.hints),
);
console.log('exp', c.expected.map((e) => `${e.distanceM.toFixed(1)}(${e.rho.toFixed(2)})${e.required ? '' : '?'}`).join(' '));
const fmt = (a: number[]) => a.map((v) => v.toFixed(3)).join(' ');
console.log('first 12', fmt(Array.from(y.slice(0, 12))));
const seg = (k: number) => {
  const m = Math.floor(n / 20);
  let s = 0;
  for (let i = k * m; i < (k + 1) * m; i++) s += y[i];
  return s / m;
};
console.log('20 segment means', fmt(Array.from({ length: 20 }, (_, k) => seg(k))));
console.log('sigma0', estimateNoise(y), 'slow', estimateSlowNoise(y));
const hint = tr.hints.pulseWidthNs !== undefined ? (tr.hints.pulseWidthNs * 1e-9) / dt : null;
const L = findLaunch(rec as never, (process.env.M ?? 'auto') as never, hint, estimateSlowNoise(y));
console.log('launch', JSON.stringify(L));
const opts = { vf: c.vf, z0Ohm: c.z0Ohm, loss: noLoss ? undefined : c.loss };
for (const mode of ['auto', 'step', 'pulse'] as const) {
  const a = analyzeCsv(c.csv, po, { ...opts, mode } as never);
  console.log(
    mode,
    '->',
    a.mode,
    a.events
      .map(
        (e) =>
          `${e.distanceM.toFixed(2)}(${e.reflectionCoefficient.toFixed(2)} raw ${(e.reflectionCoefficientRaw ?? NaN).toFixed(2)} snr ${e.snr.toFixed(0)} ±${e.uncertaintyM.toFixed(1)} m${e.likelyMultipleOf})`,
      )
      .join(' '),
  );
  console.log('   warn', a.warnings.map((w) => w.code).join(' '));
}
