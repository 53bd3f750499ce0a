/**
 * The trace engine on the phone, off the page's thread: the same function the
 * server's analysis workers run, so a file analysed here and on the server
 * with the same library values gives the same events.
 */
import { analyseBytes, type AnalysisCable, type Outcome } from '../../../server/traces/analysis';
import type { TraceSettings } from '../../../shared/schemas/traces';
import { DEFAULT_MAX_BYTES } from '../../../shared/trace';

export interface DeviceAnalysisRequest {
  id: number;
  bytes: ArrayBuffer;
  settings: TraceSettings;
  cable: AnalysisCable;
}

export interface DeviceAnalysisAnswer {
  id: number;
  outcome: Outcome;
  sampleCount: number;
  elapsedMs: number;
}

self.onmessage = (e: MessageEvent<DeviceAnalysisRequest>) => {
  const start = performance.now();
  const { outcome, parsed } = analyseBytes(new Uint8Array(e.data.bytes), e.data.settings, e.data.cable, DEFAULT_MAX_BYTES);
  // The samples stay here: the page shows the events, and the server keeps the file.
  const answer: DeviceAnalysisAnswer = {
    id: e.data.id,
    outcome,
    sampleCount: parsed?.amplitude.length ?? 0,
    elapsedMs: performance.now() - start,
  };
  self.postMessage(answer);
};
