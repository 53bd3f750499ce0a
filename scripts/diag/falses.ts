/**
 * Lists every false event the engine reports on the tuning sets, with what is known about it:
 * its signal-to-noise ratio, size, the nearest expected event and multiple, and where it stands
 * relative to the cable's end. For developing the engine only.
 *
 *   npx tsx scripts/diag/falses.ts [--no-loss] [--set tuning2]
 */
import { analyzeCsv } from '../../shared/trace';
import { type ReportedEvent, scoreCase } from '../sim2/score';
import { buildSet, type SetName } from '../sim2/sets';

const noLoss = process.argv.includes('--no-loss');
const si = process.argv.indexOf('--set');
const sets = si >= 0 ? [process.argv[si + 1]] : ['tuning', 'tuning2', 'tuning3', 'tuning4'];
const tol = (d: number) => Math.max(0.5, 0.01 * d);
for (const set of sets) {
  if (!set.startsWith('tuning')) throw new Error('tuning sets only');
  for (const c of buildSet(set as SetName)) {
    const a = analyzeCsv(c.csv, (c.parseOptions ?? {}) as never, { vf: c.vf, z0Ohm: c.z0Ohm, loss: noLoss ? undefined : c.loss });
    const ev = a.events as unknown as Array<ReportedEvent & { snr: number; reflectionCoefficientRaw?: number; uncertaintyM: number }>;
    const s = scoreCase(c, ev);
    if (s.falseEvents === 0) continue;
    const end = c.expected[c.expected.length - 1];
    for (const g of ev) {
      const matched = c.expected.some((e) => Math.abs(e.distanceM - g.distanceM) <= tol(e.distanceM));
      if (matched) continue; // approximate: matched to some expected event
      const echo = c.echoes.find((x) => Math.abs(x.distanceM - g.distanceM) <= tol(x.distanceM) * 3);
      if (echo && g.likelyMultipleOf !== null) continue;
      const near = c.expected.reduce((b, e) => (Math.abs(e.distanceM - g.distanceM) < Math.abs(b.distanceM - g.distanceM) ? e : b));
      const nearEcho = c.echoes.reduce<null | { distanceM: number; rho: number }>(
        (b, e) => (!b || Math.abs(e.distanceM - g.distanceM) < Math.abs(b.distanceM - g.distanceM) ? e : b),
        null,
      );
      console.log(
        [
          c.id.slice(0, 40),
          `${c.mode} snrDb ${c.snrDb.toFixed(0)} src ${c.sourceOhm.toFixed(0)}/${c.z0Ohm.toFixed(0)}`,
          `FALSE ${g.type} at ${g.distanceM.toFixed(2)} ρ ${g.reflectionCoefficient.toFixed(3)} raw ${(g.reflectionCoefficientRaw ?? NaN).toFixed(3)} snr ${g.snr.toFixed(1)} ± ${g.uncertaintyM.toFixed(2)} mult ${g.likelyMultipleOf}`,
          `near ${near.what} ${near.distanceM.toFixed(2)}${near.required ? '' : '?'} (${near.rho.toFixed(3)})`,
          `end ${end.what} ${end.distanceM.toFixed(2)} ${end.rho.toFixed(2)}`,
          nearEcho ? `echo ${nearEcho.distanceM.toFixed(2)} (${nearEcho.rho.toFixed(3)})` : 'no echo',
          `all ${ev.map((e) => `${e.distanceM.toFixed(1)}(${(e.reflectionCoefficientRaw ?? e.reflectionCoefficient).toFixed(3)}${e.likelyMultipleOf !== null ? '*' : ''})`).join(' ')}`,
        ].join(' | '),
      );
    }
  }
}
