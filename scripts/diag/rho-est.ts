/** Each required event of an estimated-loss reading (no library loss): raw ρ, corrected ρ, the truth, the ratio. Tuning sets only. */
import { analyzeCsv } from '../../shared/trace';

type Analysis = ReturnType<typeof analyzeCsv>;
type Event = Analysis['events'][number];
import { buildSet, type SetName } from '../sim2/sets';
for (const setName of ['tuning', 'tuning2', 'tuning3', 'tuning4']) {
  for (const c of buildSet(setName as SetName)) {
    let a: Analysis;
    try {
      a = analyzeCsv(c.csv, (c.parseOptions ?? {}) as never, { vf: c.vf, z0Ohm: c.z0Ohm });
    } catch {
      continue;
    }
    if (a.lossSource !== 'estimated') continue;
    const mode: string = a.mode;
    const db = a.lossDbPer100m?.find((p) => p.frequencyHz === 1e7)?.dbPer100m;
    for (const e of c.expected.filter((x) => x.required)) {
      const n = a.events.reduce(
        (p: Event | null, q: Event): Event | null =>
          !p || Math.abs(q.distanceM - e.distanceM) < Math.abs(p.distanceM - e.distanceM) ? q : p,
        null as Event | null,
      );
      if (!n || Math.abs(n.distanceM - e.distanceM) > 0.1 * Math.max(e.distanceM, 20)) continue;
      const raw = n.reflectionCoefficientRaw ?? n.reflectionCoefficient;
      const cor = n.reflectionCoefficient;
      const errRaw = Math.abs(Math.log(Math.abs(raw / e.rhoSeen)));
      const errCor = Math.abs(Math.log(Math.abs(cor / e.rhoSeen)));
      console.log(
        [
          c.id.slice(0, 30).padEnd(30),
          mode.padEnd(5),
          (a.lossEstimatedFrom ?? []).join('+').slice(0, 14).padEnd(14),
          String(db).padStart(6),
          e.distanceM.toFixed(1).padStart(7),
          'raw',
          raw.toFixed(3),
          'cor',
          cor.toFixed(3),
          'seen',
          e.rhoSeen.toFixed(3),
          'ratio',
          (cor / raw).toFixed(2),
          'want',
          (e.rhoSeen / raw).toFixed(2),
          errCor < errRaw ? 'COR' : 'RAW',
          n.type,
          e.type,
        ].join(' '),
      );
    }
  }
}
