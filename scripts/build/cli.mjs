// npm run analyze / npm run locate: run the built command, building the command-line tools first
// when they are missing or older than the sources they are made from (a fresh clone after npm ci
// has no dist/ yet). Anything the build says goes to stderr, so --json output stays clean.
//
//   node scripts/build/cli.mjs analyze FILE --vf 0.66 [...]
import fs from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { newest } from './newest.mjs';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const [command, ...args] = process.argv.slice(2);
if (command !== 'analyze' && command !== 'locate') {
  process.stderr.write(`usage: node scripts/build/cli.mjs analyze|locate [options]\n`);
  process.exit(2);
}
const built = path.join(root, 'dist/cli', `${command}.js`);
const sources = [
  'shared',
  'scripts/analyze.ts',
  'scripts/locate.ts',
  'scripts/rholog.ts',
  'scripts/build/cli-build.mjs',
  'package-lock.json',
];

let builtAt = 0;
try {
  builtAt = fs.statSync(built).mtimeMs;
} catch {
  builtAt = 0;
}
if (builtAt < Math.max(...sources.map((s) => newest(path.join(root, s))))) {
  const { buildCli } = await import('./cli-build.mjs');
  try {
    await buildCli(root);
  } catch (err) {
    process.stderr.write(
      `${command}: building the command-line tools failed: ${err instanceof Error ? err.message.split('\n')[0] : err}\n`,
    );
    process.exit(1);
  }
}
// The built command reads its options from process.argv[2…], as when node runs it directly.
process.argv = [process.argv[0], built, ...args];
createRequire(import.meta.url)(built);
