/** Required events found but typed wrong on the tuning sets (never the held-out ones), with what the engine read. */
import { analyzeCsv } from '../../shared/trace';
import { buildSet, type SetName } from '../sim2/sets';

const noLoss = process.argv.includes('--no-loss');
const only = process.argv.find((a) => a.startsWith('--only='))?.slice(7);
for (const set of ['tuning', 'tuning2', 'tuning3', 'tuning4']) {
  for (const c of buildSet(set as SetName)) {
    if (only && !c.id.startsWith(only)) continue;
    let a;
    try {
      a = analyzeCsv(c.csv, (c.parseOptions ?? {}) as never, { vf: c.vf, z0Ohm: c.z0Ohm, loss: noLoss ? undefined : c.loss });
    } catch {
      continue;
    }
    const src = a.warnings.find((w) => w.code.includes('SOURCE'))?.message ?? '';
    for (const e of c.expected.filter((x) => x.required)) {
      const tol = Math.max(0.5, 0.01 * e.distanceM);
      const g = a.events.find((x) => Math.abs(x.distanceM - e.distanceM) <= tol);
      if (!g) continue;
      const ok = g.type === e.type || (e.alsoAccept ?? []).includes(g.type as never);
      if (ok && !process.argv.includes('--all')) continue;
      const last = a.events.filter((x) => x.distanceM > g.distanceM && x.likelyMultipleOf === null).length;
      console.log(
        [c.id.slice(0, 40), e.what, e.distanceM.toFixed(1), `exp ${e.type}`, `got ${g.type}`, `ρ ${g.reflectionCoefficient.toFixed(3)}`,
          `raw ${(g.reflectionCoefficientRaw ?? NaN).toFixed(3)}`, `true ${e.rho.toFixed(3)} seen ${e.rhoSeen.toFixed(3)}`,
          `after ${last}`, `lc ${g.lossCorrected}`, `rise ${g.riseTimeNs.toFixed(2)}/${(a.riseTimeNs ?? NaN).toFixed(2)}`, `pw ${a.pulseWidthNs?.toFixed(1)}`,
          `snr ${g.snr.toFixed(0)}`, src.slice(0, 60)].join(' | '),
      );
    }
  }
}
