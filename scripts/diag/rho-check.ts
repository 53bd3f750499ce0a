/**
 * Reflection coefficients read without the library's loss on the tuning sets (never the held-out ones):
 * for each required event found within tolerance, the true own ρ, the raw reading and the loss-corrected
 * one, and where the loss came from. For developing the engine.
 *
 *   npx tsx scripts/diag/rho-check.ts
 */
import { analyzeCsv } from '../../shared/trace';
import { buildSet, type SetName } from '../sim2/sets';

let better = 0;
let worse = 0;
const rows: string[] = [];
for (const set of ['tuning', 'tuning2', 'tuning3', 'tuning4']) {
  for (const c of buildSet(set as SetName)) {
    let a;
    try {
      a = analyzeCsv(c.csv, (c.parseOptions ?? {}) as never, { vf: c.vf, z0Ohm: c.z0Ohm });
    } catch {
      continue;
    }
    for (const e of c.expected.filter((x) => x.required && x.rhoCheck !== false)) {
      const tol = Math.max(0.5, 0.01 * e.distanceM);
      const g = a.events.find((x) => Math.abs(x.distanceM - e.distanceM) <= tol);
      if (!g || g.reflectionCoefficientRaw === undefined || g.reflectionCoefficientRaw === null) continue;
      const raw = g.reflectionCoefficientRaw;
      const cor = g.reflectionCoefficient;
      if (Math.abs(cor - raw) < 1e-9) continue;
      const eRaw = Math.abs(Math.abs(raw) - Math.abs(e.rho));
      const eCor = Math.abs(Math.abs(cor) - Math.abs(e.rho));
      if (eCor < eRaw) better++;
      else worse++;
      rows.push(
        `${c.id.slice(0, 40).padEnd(40)} ${c.mode.padEnd(5)} ${(a.lossSource ?? 'none').padEnd(9)} d ${e.distanceM.toFixed(1).padStart(7)} true ${e.rho.toFixed(3).padStart(6)} raw ${raw.toFixed(3).padStart(6)} cor ${cor.toFixed(3).padStart(6)} ${eCor < eRaw ? 'better' : 'WORSE'}`,
      );
    }
  }
}
console.log(rows.join('\n'));
console.log(`corrected nearer the truth ${better}, further ${worse}`);
