// The analysis worker's entry when the server runs from TypeScript source (tsx, vitest):
// a worker thread does not inherit the parent's TypeScript loader, so it loads the worker
// through tsx's own import. A built server starts the built analysis-worker.js instead.
import { tsImport } from 'tsx/esm/api';

const worker = await tsImport('./analysis-worker.ts', import.meta.url);
export default worker.default;
