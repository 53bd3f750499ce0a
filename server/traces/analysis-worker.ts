import { createHash } from 'node:crypto';
import fs from 'node:fs/promises';
import type { MessagePort } from 'node:worker_threads';
import type { TraceSettings } from '../../shared/schemas/traces';
import type { ParsedTrace } from '../../shared/trace';
import { move, transferableSymbol, valueSymbol, workerData } from 'piscina';
import { analyseBytes, readBytes, type AnalysisCable, type Outcome } from './analysis';

interface TaskBase {
  /** The file to read: an upload waiting in the inbox, or a stored raw file. */
  path: string;
  settings: TraceSettings;
  maxBytes: number;
  /** Told when the work starts, so the time budget counts work, not the wait in the queue. */
  started?: MessagePort;
}

/** Analyse a file with a cable's values. */
export interface AnalyseTask extends TaskBase {
  kind: 'analyse';
  cable: AnalysisCable;
}

/** Read a stored file's samples again, to draw it. */
export interface ReadTask extends TaskBase {
  kind: 'read';
}

export type WorkerTask = AnalyseTask | ReadTask;

export interface AnalyseResult {
  sha256: string;
  sizeBytes: number;
  outcome: Outcome;
  /** The samples, when the file could be read: the request thread keeps them to draw the trace without reading it again. */
  parsed: ParsedTrace | null;
  /** Time the worker spent on the file. */
  elapsedMs: number;
}

export interface ReadResult {
  parsed: ParsedTrace;
  elapsedMs: number;
}

/**
 * A result whose sample arrays are moved to the request thread, not copied:
 * their memory changes hands (the worker is done with them), so a 200,000-
 * sample trace does not cost a 3 MB copy on the thread that answers requests.
 * The engine allocates each array for its record (then cuts it to length),
 * so an array at the start of a plain ArrayBuffer is moved with its buffer;
 * any other (shared memory, a view into the middle of a block) is copied.
 */
function movingSamples<R extends { parsed: ParsedTrace | null }>(result: R): R {
  const buffers = new Set<ArrayBuffer>();
  for (const a of result.parsed ? [result.parsed.timeS, result.parsed.amplitude] : []) {
    if (a.buffer instanceof ArrayBuffer && a.byteOffset === 0) buffers.add(a.buffer);
  }
  if (!buffers.size) return result;
  // piscina unwraps this on the way out and sends the value with the buffers in its transfer list.
  return move({ [transferableSymbol]: [...buffers], [valueSymbol]: result }) as unknown as R;
}

/**
 * One task in a worker thread of the analysis pool. The file is read once,
 * hashed, parsed and analysed here; its bytes never reach the request thread.
 */
export default async function runTask(task: WorkerTask): Promise<AnalyseResult | ReadResult> {
  const start = performance.now();
  task.started?.postMessage('started');
  task.started?.close();
  const bytes = await fs.readFile(task.path);
  if (task.kind === 'read') return movingSamples({ parsed: readBytes(bytes, task.settings, task.maxBytes), elapsedMs: performance.now() - start });
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  const { outcome, parsed } = analyseBytes(bytes, task.settings, task.cable, task.maxBytes);
  return movingSamples({ sha256, sizeBytes: bytes.length, outcome, parsed, elapsedMs: performance.now() - start });
}

/**
 * A made-up step record (launch at 25 ns, a rise in impedance at 250 ns, a
 * little noise) of about the size of a field upload, to run the engine on.
 */
function madeUpRecord(): Uint8Array {
  let seed = 12345;
  const noise = () => ((seed = (Math.imul(seed, 1103515245) + 12345) >>> 0) / 2 ** 32 - 0.5) * 0.004;
  const rows = ['time_ns,voltage_V'];
  for (let i = 0; i < 10_000; i++) {
    const t = i * 0.05;
    const v = 0.25 * (1 + Math.tanh((t - 25) / 0.3)) + 0.15 * (1 + Math.tanh((t - 250) / 1.5)) + noise();
    rows.push(`${t.toFixed(3)},${v.toFixed(5)}`);
  }
  return new TextEncoder().encode(rows.join('\n'));
}

/**
 * In a running server each worker runs the engine a few times on a made-up
 * record as it starts (before it takes any file), so the first uploads find
 * the engine's code compiled: the first runs of cold code are several times
 * slower than the rest. The results are thrown away.
 */
if ((workerData as { warmEngine?: boolean } | undefined)?.warmEngine) {
  const bytes = madeUpRecord();
  for (let run = 0; run < 3; run++) {
    try {
      analyseBytes(bytes, { mode: 'auto' }, { vf: 0.66, vfTolerance: 0.02, z0Ohm: 50 }, bytes.length + 1);
    } catch {
      // Warming only: a real file is analysed, and its failures reported, as usual.
    }
  }
}
