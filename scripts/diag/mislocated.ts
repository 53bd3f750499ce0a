/**
 * Required events of the tuning sets (never the held-out ones) that were reported, but outside the
 * distance tolerance (more than one and at most four tolerances away): the located-but-wrong ones,
 * which count once as a miss and once as a false event. Prints the signed error in per cent of the
 * true distance, the event's kind and the record's mode. For developing the engine.
 *
 *   npx tsx scripts/diag/mislocated.ts [--no-loss]
 */
import { analyzeCsv } from '../../shared/trace';
import { buildSet, type SetName } from '../sim2/sets';
const noLoss = process.argv.includes('--no-loss');
const rows: [number, string][] = [];
for (const set of ['tuning', 'tuning2', 'tuning3', 'tuning4']) {
  for (const c of buildSet(set as SetName)) {
    let ev: { distanceM: number; type: string; reflectionCoefficient: number | null }[] = [];
    try {
      ev = analyzeCsv(c.csv, (c.parseOptions ?? {}) as never, {
        vf: c.vf,
        z0Ohm: c.z0Ohm,
        loss: noLoss ? undefined : (c.loss as never),
      }).events as never;
    } catch {
      continue;
    }
    for (const e of c.expected.filter((x) => x.required)) {
      const tol = Math.max(0.5, 0.01 * e.distanceM);
      if (!ev.length) continue;
      const g = ev.reduce((b, x) => (Math.abs(x.distanceM - e.distanceM) < Math.abs(b.distanceM - e.distanceM) ? x : b));
      const near = Math.abs(g.distanceM - e.distanceM);
      if (near > tol && near <= 4 * tol) {
        const pct = (100 * (g.distanceM - e.distanceM)) / e.distanceM;
        rows.push([
          pct,
          `${pct.toFixed(2).padStart(7)} % ${c.mode.padEnd(5)} ${c.id.slice(0, 42).padEnd(42)} true ${e.distanceM.toFixed(1).padStart(7)} got ${g.distanceM.toFixed(1).padStart(7)} ρ ${e.rho?.toFixed(2) ?? '?'} → ${g.reflectionCoefficient?.toFixed(2) ?? '?'} ${g.type} | ${e.what}`,
        ]);
      }
    }
  }
}
rows.sort((a, b) => a[0] - b[0]);
console.log(rows.map((r) => r[1]).join('\n'));
console.log(`${rows.length} mislocated; early ${rows.filter((r) => r[0] < 0).length}, late ${rows.filter((r) => r[0] > 0).length}`);
