/**
 * Every reported event on the tuning sets with its signal-to-noise ratio and what the scorer made
 * of it (required found, optional, flagged multiple, false). For developing the engine only.
 *
 *   npx tsx scripts/diag/snrdist.ts [--no-loss]
 */
import { analyzeCsv } from '../../shared/trace';
import { type ReportedEvent, scoreCase } from '../sim2/score';
import { buildSet, type SetName } from '../sim2/sets';

const noLoss = process.argv.includes('--no-loss');
const tol = (d: number) => Math.max(0.5, 0.01 * d);
for (const set of ['tuning', 'tuning2', 'tuning3', 'tuning4']) {
  for (const c of buildSet(set as SetName)) {
    const a = analyzeCsv(c.csv, (c.parseOptions ?? {}) as never, { vf: c.vf, z0Ohm: c.z0Ohm, loss: noLoss ? undefined : c.loss });
    const ev = a.events as unknown as Array<ReportedEvent & { snr: number; reflectionCoefficientRaw?: number }>;
    scoreCase(c, ev);
    for (const g of ev) {
      const m = c.expected.find((e) => Math.abs(e.distanceM - g.distanceM) <= tol(e.distanceM));
      const label = m ? (m.required ? 'REQ' : 'OPT') : g.likelyMultipleOf !== null ? 'MUL' : 'FALSE';
      console.log(label, g.snr.toFixed(2), c.id, g.distanceM.toFixed(2), (g.reflectionCoefficientRaw ?? g.reflectionCoefficient).toFixed(4), c.mode);
    }
  }
}
