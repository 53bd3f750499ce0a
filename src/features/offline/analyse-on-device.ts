import type { AnalysisCable, Outcome } from '../../../server/traces/analysis';
import type { TraceSettings } from '../../../shared/schemas/traces';
import type { DeviceAnalysisRequest } from './device-analysis.worker';

export interface DeviceOutcome {
  outcome: Outcome;
  sampleCount: number;
  /** Time the engine took in the worker, for the technician to see and for measuring. */
  elapsedMs: number;
}

/** Analyse a file in a Web Worker on this device; one worker per file, ended when it answers. */
export function analyseOnDevice(bytes: ArrayBuffer, settings: TraceSettings, cable: AnalysisCable): Promise<DeviceOutcome> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(new URL('./device-analysis.worker.ts', import.meta.url), { type: 'module', name: 'rholog-engine' });
    worker.onmessage = (e: MessageEvent<DeviceOutcome>) => {
      worker.terminate();
      resolve(e.data);
    };
    worker.onerror = (e) => {
      worker.terminate();
      reject(new Error(`The trace engine stopped on this device: ${e.message || 'unknown error'}`));
    };
    // A copy of the bytes goes to the worker; the page keeps its own for the outbox.
    const request: DeviceAnalysisRequest = { bytes: bytes.slice(0), settings, cable };
    worker.postMessage(request);
  });
}
