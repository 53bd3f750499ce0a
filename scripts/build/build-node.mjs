// Builds the server, its analysis worker and the command-line tools to plain
// JavaScript with esbuild, so production and batch use run with node alone.
//
//   node scripts/build/build-node.mjs            (npm run build:node)
//
// Output: dist/server/index.js, dist/server/analysis-worker.js (the worker pool
// starts it from beside the server), dist/server/traces/ (demo trace files),
// dist/cli/rholog.js with dist/cli/analyze.js and dist/cli/locate.js (CommonJS, self-contained).
import { build } from 'esbuild';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const out = path.join(root, 'dist');

const common = {
  absWorkingDir: root,
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  // Packages load from node_modules at run time (sqlite3 is native; the rest keep their own module format).
  packages: 'external',
  sourcemap: 'linked',
  logLevel: 'warning',
  legalComments: 'none',
  // The engine imports csv-parse's browser build so the same code runs in the phone's browser; under node the
  // package's own build is the same parser on node's native Buffer (the browser build's Buffer stand-in turns a
  // large file's text into bytes in JavaScript, seconds for a few megabytes when the general reader is needed).
  alias: { 'csv-parse/browser/esm/sync': 'csv-parse/sync' },
};

const started = Date.now();
await Promise.all([
  build({
    ...common,
    entryPoints: { index: 'server/index.ts', 'analysis-worker': 'server/traces/analysis-worker.ts' },
    outdir: path.join(out, 'server'),
  }),
  build({
    ...common,
    entryPoints: { analyze: 'scripts/analyze.ts', locate: 'scripts/locate.ts', rholog: 'scripts/rholog.ts' },
    outdir: path.join(out, 'cli'),
    // Start-up is most of a command's run on a small file: each command is one
    // CommonJS file with its packages inside (Node's ES module loader and the
    // package lookups cost more than the work itself), and the dispatcher loads
    // a subcommand with a plain require only when it is asked for.
    format: 'cjs',
    packages: 'bundle',
    supported: { 'dynamic-import': false },
    external: ['./analyze.js', './locate.js'],
    banner: { js: '#!/usr/bin/env node' },
  }),
]);

// The demo seed reads its trace files from beside its own module: in the bundle, beside dist/server/index.js.
fs.cpSync(path.join(root, 'server/db/demo/traces'), path.join(out, 'server/traces'), { recursive: true });
fs.chmodSync(path.join(out, 'cli/rholog.js'), 0o755);
fs.writeFileSync(path.join(out, 'server/package.json'), '{ "type": "module" }\n');
fs.writeFileSync(path.join(out, 'cli/package.json'), '{ "type": "commonjs" }\n');
process.stdout.write(`built dist/server and dist/cli in ${Date.now() - started} ms\n`);
