/** Runs the simulator sweep through the engine and prints each case and the worst error. */
import { analyzeCsv } from '../../shared/trace';
import { buildSweep, scoreCase } from './sweep';

const scaleArg = process.argv.find((a) => a.startsWith('--noise-scale='));
const cases = buildSweep({ clean: process.argv.includes('--clean'), noiseScale: scaleArg ? Number(scaleArg.split('=')[1]) : 1 });
let worst = { m: 0, tol: 0, id: '' };
let failed = 0;
let hits = 0;
let checks = 0;
for (const c of cases) {
  try {
    const a = analyzeCsv(c.csv, {}, { vf: c.vf, z0Ohm: c.z0Ohm });
    const r = scoreCase(c, a.events);
    hits += r.windowHits;
    checks += r.windowChecks;
    if (r.worstErrorOfTolerance > worst.tol) worst = { m: r.worstErrorM, tol: r.worstErrorOfTolerance, id: c.id };
    if (!r.ok) failed++;
    const got = a.events
      .map(
        (e) =>
          `${e.distanceM.toFixed(2)}(${e.reflectionCoefficient.toFixed(2)})${e.type[0]}${e.type.includes('-') ? e.type.split('-')[1][0] : ''}${e.likelyMultipleOf !== null ? '*' : ''}`,
      )
      .join(' ');
    console.log(
      `${r.ok ? 'ok  ' : 'FAIL'} ${c.id} [${a.mode}] exp ${c.expected.map((e) => e.distanceM.toFixed(2)).join(' ')} | got ${got}${r.ok ? '' : '\n       ' + r.problems.join('; ')}`,
    );
  } catch (err) {
    failed++;
    console.log(`FAIL ${c.id} threw ${(err as Error).message}`);
  }
}
console.log(
  `${cases.length} traces, ${failed} failed; worst error ${worst.m.toFixed(3)} m (${(worst.tol * 100).toFixed(0)} % of its tolerance) in ${worst.id}; windows held ${hits} of ${checks}`,
);
