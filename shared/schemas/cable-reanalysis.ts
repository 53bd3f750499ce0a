/** A re-analysis of every current trace of one cable type, as the cable page shows it. */
export interface CableReanalysisView {
  id: number;
  cableTypeId: number;
  /** The library revision and VF the traces are analysed with. */
  cableTypeRevision: number;
  vf: number;
  status: 'running' | 'done';
  requestedBy: { id: number; name: string };
  startedAt: string;
  finishedAt: string | null;
  traceTotal: number;
  tracesDone: number;
  tracesOk: number;
  /** Analysed, but the engine could not read the file this time. */
  tracesFailed: number;
  /** Not analysed: the stored file is missing or no longer matches its SHA-256. */
  tracesSkipped: number;
  /** Findings made from the traces done so far; how many the new analysis places at least movedThresholdM elsewhere; how many it no longer finds. */
  findings: number;
  findingsMoved: number;
  findingsUnmatched: number;
  movedThresholdM: number;
  maxShiftM: number | null;
  meanShiftM: number | null;
  skipped: Array<{ traceId: number; note: string }>;
}
