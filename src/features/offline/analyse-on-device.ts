import type { AnalysisCable, Outcome } from '../../../server/traces/analysis';
import type { TraceSettings } from '../../../shared/schemas/traces';
import type { DeviceAnalysisAnswer, DeviceAnalysisRequest } from './device-analysis.worker';

export interface DeviceOutcome {
  outcome: Outcome;
  sampleCount: number;
  /** Time the engine took in the worker, for the technician to see and for measuring. */
  elapsedMs: number;
}

let engine: Worker | null = null;
let nextId = 1;
const waiting = new Map<number, { resolve: (o: DeviceOutcome) => void; reject: (e: Error) => void }>();

function failAll(message: string) {
  for (const w of waiting.values()) w.reject(new Error(message));
  waiting.clear();
}

/**
 * The engine's worker, started once and kept: starting it as soon as the
 * analyse page opens means its script is loaded while there may still be
 * signal, and each later analysis starts at once.
 */
export function startEngine(): Worker {
  if (engine) return engine;
  const w = new Worker(new URL('./device-analysis.worker.ts', import.meta.url), { type: 'module', name: 'rholog-engine' });
  w.onmessage = (e: MessageEvent<DeviceAnalysisAnswer>) => {
    const { id, ...outcome } = e.data;
    waiting.get(id)?.resolve(outcome);
    waiting.delete(id);
  };
  w.onerror = (e) => {
    e.preventDefault();
    failAll(
      `The trace engine stopped on this phone: ${e.message || 'its code could not be loaded'}. Open Rholog once with signal, then try again.`,
    );
    w.terminate();
    engine = null;
  };
  engine = w;
  return w;
}

/** Analyse a file in the Web Worker on this device; the page's own copy of the bytes stays for the outbox. */
export function analyseOnDevice(bytes: ArrayBuffer, settings: TraceSettings, cable: AnalysisCable): Promise<DeviceOutcome> {
  const w = startEngine();
  const id = nextId++;
  return new Promise((resolve, reject) => {
    waiting.set(id, { resolve, reject });
    const request: DeviceAnalysisRequest = { id, bytes: bytes.slice(0), settings, cable };
    w.postMessage(request);
  });
}
