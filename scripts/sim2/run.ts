/**
 * Runs the engine on one of the second simulator's sets and prints the score.
 *
 *   npx tsx scripts/sim2/run.ts --set tuning [--json] [--quiet] [--only TEXT] [--no-loss]
 *
 * --no-loss reads every trace without the cable's attenuation, as `analyze FILE --vf V --z0 Z` is
 * called when the library holds none: the engine then estimates the loss from the record.
 *
 * The held-out set is for measuring only: never tune on it.
 */
import { analyzeCsv } from '../../shared/trace';
import type { Sim2Case } from './cases';
import { type CaseScore, formatTally, type ReportedEvent, scoreCase, tally } from './score';
import { SET_NAMES } from './set-seeds';
import { buildSet, type SetName } from './sets';

function arg(name: string): string | undefined {
  const i = process.argv.indexOf(name);
  return i >= 0 ? process.argv[i + 1] : undefined;
}

const setName = arg('--set');
if (!setName || !(SET_NAMES as readonly string[]).includes(setName)) {
  process.stderr.write(`usage: run.ts --set ${SET_NAMES.join('|')} [--json] [--quiet] [--only TEXT] [--no-loss]\n`);
  process.exit(2);
}
const json = process.argv.includes('--json');
const quiet = process.argv.includes('--quiet');
const only = arg('--only');
const noLoss = process.argv.includes('--no-loss');

const cases = buildSet(setName as SetName, {
  onCase: (_c, i) => {
    if (!json && !quiet && i % 10 === 0) process.stderr.write(`generating ${setName} trace ${i}…\n`);
  },
}).filter((c) => !only || c.id.includes(only));

const scores: Array<{ c: Sim2Case; s: CaseScore; got: string }> = [];
for (const c of cases) {
  let events: ReportedEvent[] | null = null;
  let threw: string | undefined;
  let got = '';
  try {
    const opts = { vf: c.vf, z0Ohm: c.z0Ohm, loss: noLoss ? undefined : c.loss };
    const a = analyzeCsv(c.csv, (c.parseOptions ?? {}) as Parameters<typeof analyzeCsv>[1], opts);
    events = a.events as unknown as ReportedEvent[];
    got =
      `[${a.mode}] ` +
      events
        .map((e) => `${e.distanceM.toFixed(2)}(${e.reflectionCoefficient.toFixed(2)})${e.likelyMultipleOf !== null ? '*' : ''}`)
        .join(' ');
  } catch (err) {
    threw = (err as Error).message;
  }
  scores.push({ c, s: scoreCase(c, events, threw), got });
}

const all = tally(scores.map((x) => x.s));
const groups = new Map<string, CaseScore[]>();
for (const { c, s } of scores) {
  for (const key of [`cable ${c.cableKind}`, `mode ${c.mode}`]) {
    if (!groups.has(key)) groups.set(key, []);
    groups.get(key)!.push(s);
  }
}
const sortedGroups = [...groups.entries()].sort(([a], [b]) => a.localeCompare(b));

if (json) {
  process.stdout.write(
    JSON.stringify(
      {
        set: setName,
        summary: all,
        groups: Object.fromEntries(sortedGroups.map(([k, v]) => [k, tally(v)])),
        cases: scores.map(({ s }) => s),
      },
      null,
      2,
    ) + '\n',
  );
} else {
  if (!quiet) {
    for (const { c, s, got } of scores) {
      const exp = c.expected.map((e) => `${e.distanceM.toFixed(2)}${e.required ? '' : '?'}`).join(' ');
      console.log(
        `${s.passed ? 'ok  ' : 'FAIL'} ${c.id} exp ${exp} | got ${got}${s.passed ? '' : '\n       ' + s.problems.join('; ')}`,
      );
    }
  }
  console.log(formatTally(`${setName} set`, all));
  for (const [k, v] of sortedGroups) console.log('  ' + formatTally(k, tally(v)));
}
