/** Runs the hand-made field cases through the engine and prints each case. */
import { analyzeCsv } from '../../shared/trace';
import { buildFieldCases } from './field-cases';
import { scoreCase } from './sweep';

const only = process.argv[2];
let failed = 0;
let hits = 0;
let checks = 0;
const cases = buildFieldCases().filter((c) => !only || c.id.includes(only));
for (const c of cases) {
  try {
    const a = analyzeCsv(c.csv, {}, { vf: c.vf, z0Ohm: c.z0Ohm });
    const r = scoreCase(c, a.events);
    hits += r.windowHits;
    checks += r.windowChecks;
    if (!r.ok) failed++;
    const got = a.events
      .map(
        (e) =>
          `${e.distanceM.toFixed(2)}(${e.reflectionCoefficient.toFixed(2)})${e.type}${e.likelyMultipleOf !== null ? '*' : ''}`,
      )
      .join(' ');
    const exp = c.expected
      .map((e) => `${e.distanceM.toFixed(2)}(${e.rho.toFixed(2)})${e.type}${e.optional ? '?' : ''}`)
      .join(' ');
    console.log(`${r.ok ? 'ok  ' : 'FAIL'} ${c.id} [${a.mode}] exp ${exp} | got ${got}`);
    if (!r.ok) console.log(`       ${r.problems.join('; ')}`);
    if (only) console.log(`       warnings: ${a.warnings.map((w) => w.message).join(' | ')}; blind ${a.blindZoneM.toFixed(2)} m`);
  } catch (err) {
    failed++;
    console.log(`FAIL ${c.id} threw ${(err as Error).message}`);
  }
}
console.log(`${cases.length} field cases, ${failed} failed; windows held ${hits} of ${checks}`);
