// The command-line tools' build (dist/cli), shared by the full build and by the launcher that
// builds them on first use.
import { build } from 'esbuild';
import fs from 'node:fs';
import path from 'node:path';

/** esbuild options every node build shares. */
export function nodeCommon(root) {
  return {
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
}

/** Build dist/cli/{rholog,analyze,locate}.js from `root` (the repository). */
export async function buildCli(root) {
  const common = nodeCommon(root);
  const out = path.join(root, 'dist');
  await build({
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
  });
  fs.chmodSync(path.join(out, 'cli/rholog.js'), 0o755);
  fs.writeFileSync(path.join(out, 'cli/package.json'), '{ "type": "commonjs" }\n');
}
