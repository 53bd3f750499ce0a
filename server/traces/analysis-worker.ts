import { createHash } from 'node:crypto';
import fs from 'node:fs/promises';
import type { MessagePort } from 'node:worker_threads';
import type { TraceSettings } from '../../shared/schemas/traces';
import type { ParsedTrace } from '../../shared/trace';
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
 * One task in a worker thread of the analysis pool. The file is read once,
 * hashed, parsed and analysed here; its bytes never reach the request thread.
 */
export default async function runTask(task: WorkerTask): Promise<AnalyseResult | ReadResult> {
  const start = performance.now();
  task.started?.postMessage('started');
  task.started?.close();
  const bytes = await fs.readFile(task.path);
  if (task.kind === 'read') return { parsed: readBytes(bytes, task.settings, task.maxBytes), elapsedMs: performance.now() - start };
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  const { outcome, parsed } = analyseBytes(bytes, task.settings, task.cable, task.maxBytes);
  return { sha256, sizeBytes: bytes.length, outcome, parsed, elapsedMs: performance.now() - start };
}
