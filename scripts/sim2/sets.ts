/**
 * The second simulator's trace sets. `tuning` is for developing the engine;
 * `heldout` is drawn the same way from its own seed and is only for measuring
 * the engine on traces it was never tuned on. Sets are cached under
 * .cache/sim2/ (git-ignored), keyed by the set's seed and size and a hash of
 * the generator's source, so a change to the generator makes a fresh set.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { drawCase, type Sim2Case } from './cases';
import { SETS, type SetName } from './set-seeds';

export type { SetName } from './set-seeds';

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
      // The scorer and its runner do not change the traces, nor does the list of sets (a set's seed and size
      // name its cache file).
      if (!f.endsWith('.ts') || f === 'score.ts' || f === 'run.ts' || f === 'set-seeds.ts') continue;
      h.update(f).update(readFileSync(join(dir, f)));
    }
  }
  return h.digest('hex').slice(0, 12);
}

/** The set, from the cache when the generator has not changed. */
export function buildSet(name: SetName, opts: { onCase?: (c: Sim2Case, i: number) => void } = {}): Sim2Case[] {
  const spec = SETS[name];
  const file = join(cacheDir, `${name}-${spec.seed.toString(16)}-${spec.count}-${generatorHash()}.json`);
  if (existsSync(file)) return JSON.parse(readFileSync(file, 'utf8')) as Sim2Case[];
  const cases = generateSet(name, opts);
  mkdirSync(cacheDir, { recursive: true });
  writeFileSync(file, JSON.stringify(cases));
  return cases;
}
