/**
 * Required events of the tuning sets (never the held-out ones) that nothing was reported near (more than
 * four tolerances away), with the simulator's expected signal-to-noise ratio, highest first: the misses
 * worth a look, since a miss at high SNR is the engine's logic, not the noise. For developing the engine.
 *
 *   npx tsx scripts/diag/missnr.ts [--no-loss]
 */
import { analyzeCsv } from '../../shared/trace';
import { buildSet, type SetName } from '../sim2/sets';
const noLoss = process.argv.includes('--no-loss');
const rows: string[] = [];
for (const set of ['tuning', 'tuning2', 'tuning3', 'tuning4']) {
  for (const c of buildSet(set as SetName)) {
    let ev: { distanceM: number }[] = [];
    try {
      ev = analyzeCsv(c.csv, (c.parseOptions ?? {}) as never, {
        vf: c.vf,
        z0Ohm: c.z0Ohm,
        loss: noLoss ? undefined : (c.loss as never),
      }).events;
    } catch {
      // A record the engine refuses has no events: every required one is missed.
    }
    for (const e of c.expected.filter((x) => x.required)) {
      const tol = Math.max(0.5, 0.01 * e.distanceM);
      const near = ev.length ? Math.min(...ev.map((g) => Math.abs(g.distanceM - e.distanceM))) : Infinity;
      if (near > 4 * tol)
        rows.push(
          `${(e.snrEff ?? 0).toFixed(1).padStart(7)} ${c.mode.padEnd(5)} ${c.id.slice(0, 40).padEnd(40)} ${e.distanceM.toFixed(1).padStart(8)} ${e.what}`,
        );
    }
  }
}
rows.sort((a, b) => parseFloat(b) - parseFloat(a));
console.log(rows.join('\n'));
