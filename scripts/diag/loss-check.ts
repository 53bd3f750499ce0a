/**
 * The engine's own loss estimate against the cable's true loss, on the tuning sets (never the held-out
 * ones): for each case read without the library's loss, what the loss was read from, the estimate and the
 * truth at 10 MHz, and the signed distance error of each required event's nearest report, read with and
 * without the library's loss. For developing the engine only.
 *
 *   npx tsx scripts/diag/loss-check.ts tuning [--only TEXT]
 */
import { analyzeCsv } from '../../shared/trace';
import { buildSet, type SetName } from '../sim2/sets';

const [setName] = process.argv.slice(2);
const only = process.argv.includes('--only') ? process.argv[process.argv.indexOf('--only') + 1] : undefined;
if (!setName?.startsWith('tuning'))
  throw new Error('usage: loss-check.ts tuning|tuning2|tuning3|tuning4 (held-out sets are not for looking at)');
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
