/**
 * The engine's own loss estimate against the cable's true loss, on the tuning sets (never the held-out
 * ones): for each case read without the library's loss, what the loss was read from, the estimate and the
 * truth at 10 MHz, and the signed distance error of each required event's nearest report, read with and
 * without the library's loss. For developing the engine only.
 * A closing summary gives, by cable length, how far the estimate strays from the truth (the median and mean
 * |ln(estimate/truth)| at 10 MHz), and how many required events each reading puts within 1 % of their distance.
 *
 *   npx tsx scripts/diag/loss-check.ts tuning [--only TEXT]
 */
import { analyzeCsv } from '../../shared/trace';
import { buildSet, type SetName } from '../sim2/sets';

const [setName] = process.argv.slice(2);
const only = process.argv.includes('--only') ? process.argv[process.argv.indexOf('--only') + 1] : undefined;
if (!setName?.startsWith('tuning'))
  throw new Error('usage: loss-check.ts tuning|tuning2|tuning3|tuning4 (held-out sets are not for looking at)');
const bands: Array<{ name: string; upTo: number; logs: number[] }> = [
  { name: 'under 50 m', upTo: 50, logs: [] },
  { name: '50–300 m', upTo: 300, logs: [] },
  { name: '300–1000 m', upTo: 1000, logs: [] },
  { name: '1000 m and over', upTo: Infinity, logs: [] },
];
const within = { noLoss: 0, library: 0, required: 0 };
for (const c of buildSet(setName as SetName).filter((x) => !only || x.id.includes(only))) {
  const run = (loss: boolean) => {
    try {
      return analyzeCsv(c.csv, (c.parseOptions ?? {}) as never, {
        vf: c.vf,
        z0Ohm: c.z0Ohm,
        loss: loss ? (c.loss as never) : undefined,
      });
    } catch {
      return null;
    }
  };
  const a = run(false);
  const b = run(true);
  const at10 = (x: typeof a) => x?.lossDbPer100m?.find((p) => p.frequencyHz === 1e7)?.dbPer100m;
  const estimate = at10(a);
  const truth = at10(b);
  if (a?.lossSource === 'estimated' && estimate && truth)
    bands.find((g) => c.lengthM < g.upTo)?.logs.push(Math.log(estimate / truth));
  const closeCount = (x: typeof a) =>
    c.expected.filter(
      (e) =>
        e.required &&
        x !== null &&
        x.events.some((q) => Math.abs(q.distanceM - e.distanceM) <= Math.max(0.5, 0.01 * e.distanceM)),
    ).length;
  within.noLoss += closeCount(a);
  within.library += closeCount(b);
  within.required += c.expected.filter((e) => e.required).length;
  const errs = (x: typeof a) =>
    c.expected
      .filter((e) => e.required)
      .map((e) => {
        if (!x || x.events.length === 0) return '   -  ';
        const n = x.events.reduce((p, q) => (Math.abs(q.distanceM - e.distanceM) < Math.abs(p.distanceM - e.distanceM) ? q : p));
        const r = ((n.distanceM - e.distanceM) / Math.max(e.distanceM, 50)) * 100;
        return (Math.abs(r) > 20 ? '  far ' : (r >= 0 ? '+' : '') + r.toFixed(2)).padStart(6);
      })
      .join(' ');
  console.log(
    c.id.slice(0, 44).padEnd(44),
    (a?.lossSource ?? 'threw').padEnd(9),
    (a?.lossEstimatedFrom ?? []).join('+').padEnd(24),
    String(at10(a) ?? '-').padStart(7),
    String(at10(b) ?? '-').padStart(7),
    '| no',
    errs(a),
    '| lib',
    errs(b),
  );
}
const median = (v: number[]) => {
  const s = [...v].sort((p, q) => p - q);
  return s.length === 0 ? NaN : s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};
console.log('ln(estimate/truth) at 10 MHz, cases read with an estimated loss:');
for (const g of bands)
  if (g.logs.length > 0)
    console.log(
      `  ${g.name.padEnd(16)} ${String(g.logs.length).padStart(4)} cases  median ${median(g.logs).toFixed(2).padStart(6)}  mean |ln| ${(g.logs.reduce((p, q) => p + Math.abs(q), 0) / g.logs.length).toFixed(2)}`,
    );
console.log(
  `required events within max(0.5 m, 1 %): no loss ${within.noLoss}/${within.required}, library's loss ${within.library}/${within.required}`,
);
