// Builds the server, its analysis worker and the command-line tools to plain
// JavaScript with esbuild, so production and batch use run with node alone.
//
//   node scripts/build/build-node.mjs            (npm run build:node)
//
// Output: dist/server/index.js, dist/server/analysis-worker.js (the worker pool
// starts it from beside the server), dist/server/traces/ and samples/ (demo trace files),
// dist/cli/rholog.js with dist/cli/analyze.js and dist/cli/locate.js (CommonJS, self-contained).
import { build } from 'esbuild';
import { buildCli, nodeCommon } from './cli-build.mjs';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const out = path.join(root, 'dist');

const common = nodeCommon(root);

const started = Date.now();
await Promise.all([
  build({
    ...common,
    entryPoints: { index: 'server/index.ts', 'analysis-worker': 'server/traces/analysis-worker.ts' },
    outdir: path.join(out, 'server'),
  }),
  buildCli(root),
]);

// The demo seed reads its trace files from beside its own module: in the bundle, beside dist/server/index.js.
fs.cpSync(path.join(root, 'server/db/demo/traces'), path.join(out, 'server/traces'), { recursive: true });
fs.cpSync(path.join(root, 'server/db/demo/samples'), path.join(out, 'server/samples'), { recursive: true });
fs.writeFileSync(path.join(out, 'server/package.json'), '{ "type": "module" }\n');
process.stdout.write(`built dist/server and dist/cli in ${Date.now() - started} ms\n`);
