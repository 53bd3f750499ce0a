/**
 * The second simulator's trace sets. `tuning` is for developing the engine;
 * `heldout` is drawn the same way from its own seed and is only for measuring
 * the engine on traces it was never tuned on. Sets are cached under
 * .cache/sim2/ (git-ignored), keyed by a hash of the generator's source, so a
 * change to the generator makes a fresh set.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { drawCase, type Sim2Case } from './cases';

export type SetName =
  | 'tuning'
  | 'tuning2'
  | 'tuning3'
  | 'heldout'
  | 'heldout2'
  | 'heldout3'
  | 'heldout4'
  | 'heldout5'
  | 'tuning4'
  | 'heldout6'
  | 'heldout7'
  | 'heldout8'
  | 'heldout9'
  | 'check'
  | 'heldout10'
  | 'heldout11'
  | 'heldout12';

const SETS: Partial<Record<SetName, { seed: number; count: number }>> = {
  tuning: { seed: 0x51a7e, count: 80 },
  // A second set for developing the engine, drawn the same way from its own seed: more cases to tune on.
  tuning2: { seed: 0x510e52, count: 80 },
  // A third set to tune on, drawn when the fifth held-out set was: more cases to tune on.
  tuning3: { seed: 0x9b05688c, count: 80 },
  // Held out: for measuring the engine only. Never tune on it, print it or read its results.
  heldout: { seed: 0x2b7e15, count: 120 },
  // A second held-out set, drawn after the first had been measured once: the same rules apply.
  heldout2: { seed: 0x6a09e6, count: 120 },
  // A third, drawn after the second had been measured once: the same rules apply.
  heldout3: { seed: 0x3c6ef3, count: 120 },
  // A fourth, drawn after the third had been measured: the same rules apply.
  heldout4: { seed: 0xa54ff5, count: 120 },
  // A fifth, drawn after the fourth had been measured once, before this round's engine changes: the same rules apply.
  heldout5: { seed: 0x1f83d9ab, count: 120 },
  // A fourth set to tune on, drawn when the sixth held-out set was: more cases to tune on.
  tuning4: { seed: 0x1a3a49ef, count: 80 },
  // A sixth, drawn after the fifth had been measured once, before this round's engine changes: the same rules apply.
  heldout6: { seed: 0x8622ec4d, count: 120 },
  // A seventh, drawn after the sixth had been run once on the engine as this round began: the same rules apply.
  heldout7: { seed: 0xb1176e92, count: 120 },
  // An eighth, drawn after the seventh had been run once on the final engine of its round, before this round's engine changes: the same rules apply.
  heldout8: { seed: 0x3f09f272, count: 120 },
  // A ninth, drawn after the eighth had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout9: { seed: 0x00646396, count: 120 },
  // A check set for judging each engine change during a round, so a change that helps only the cases it was
  // tuned on shows up before the held-out run: its summary lines may be read, its cases never printed or inspected.
  check: { seed: 0x7c4a9e31, count: 120 },
  // A tenth, drawn after the ninth had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout10: { seed: 0x5be0cd19, count: 120 },
  // An eleventh, drawn after the tenth had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout11: { seed: 0x714f7121, count: 120 },
  // A twelfth, drawn after the eleventh had been run once on the final engine of its round, for the next round: the same rules apply.
  heldout12: { seed: 0x428a2f98, count: 120 },
};

/** Seed of case i of a set: a splitmix-style scramble of the set's seed and the index. */
function caseSeed(setSeed: number, i: number): number {
  let x = (setSeed ^ Math.imul(i + 1, 0x9e3779b9)) >>> 0;
  x = Math.imul(x ^ (x >>> 16), 0x85ebca6b) >>> 0;
  x = Math.imul(x ^ (x >>> 13), 0xc2b2ae35) >>> 0;
  return (x ^ (x >>> 16)) >>> 0;
}

export function generateSet(name: SetName, opts: { count?: number; onCase?: (c: Sim2Case, i: number) => void } = {}): Sim2Case[] {
  const spec = SETS[name];
  if (!spec) throw new Error(`no trace set named ${name}`);
  const { seed, count } = spec;
  const out: Sim2Case[] = [];
  for (let i = 0; i < (opts.count ?? count); i++) {
    const c = drawCase(caseSeed(seed, i), i, name);
    opts.onCase?.(c, i);
    out.push(c);
  }
  return out;
}

const here = dirname(fileURLToPath(import.meta.url));
const cacheDir = join(here, '..', '..', '.cache', 'sim2');

function generatorHash(): string {
  const h = createHash('sha256');
  for (const dir of [here, join(here, '..', 'sim')]) {
    for (const f of readdirSync(dir).sort()) {
      // The scorer and its runner do not change the traces.
      if (!f.endsWith('.ts') || f === 'score.ts' || f === 'run.ts') continue;
      h.update(f).update(readFileSync(join(dir, f)));
    }
  }
  return h.digest('hex').slice(0, 12);
}

/** The set, from the cache when the generator has not changed. */
export function buildSet(name: SetName, opts: { onCase?: (c: Sim2Case, i: number) => void } = {}): Sim2Case[] {
  const file = join(cacheDir, `${name}-${generatorHash()}.json`);
  if (existsSync(file)) return JSON.parse(readFileSync(file, 'utf8')) as Sim2Case[];
  const cases = generateSet(name, opts);
  mkdirSync(cacheDir, { recursive: true });
  writeFileSync(file, JSON.stringify(cases));
  return cases;
}
