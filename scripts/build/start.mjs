// npm start: run the built server with node. Builds first only when the build
// is missing or older than the sources it is made from, so a start after an
// unchanged build answers within a second or two.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { newest } from './newest.mjs';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const outputs = ['dist/client/index.html', 'dist/server/index.js', 'dist/server/analysis-worker.js'];
const sources = ['src', 'server', 'shared', 'public', 'index.html', 'vite.config.ts', 'package.json', 'package-lock.json'];

function builtAt() {
  let oldest = Infinity;
  for (const o of outputs) {
    try {
      oldest = Math.min(oldest, fs.statSync(path.join(root, o)).mtimeMs);
    } catch {
      return 0;
    }
  }
  return oldest;
}

const sourcesAt = Math.max(...sources.map((s) => newest(path.join(root, s))));
if (builtAt() < sourcesAt) {
  process.stdout.write('The build is missing or older than the sources: building (npm run build)…\n');
  const r = spawnSync('npm', ['run', 'build'], { cwd: root, stdio: 'inherit' });
  if (r.status !== 0) {
    process.stderr.write(`npm run build failed (exit ${r.status ?? r.signal}); not starting.\n`);
    process.exit(1);
  }
}
process.env.NODE_ENV ??= 'production';
await import(pathToFileURL(path.join(root, 'dist/server/index.js')).href);
