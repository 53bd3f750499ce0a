import type { LocateMethod } from '../locate/estimate';

/** A location method, or the best location fused from them. */
export type ScoredMethod = LocateMethod | 'best-location';

export const SCORED_METHOD_LABELS: Record<ScoredMethod, string> = {
  'best-location': 'Best location (all readings)',
  'tdr-single-ended': 'TDR from one end',
  'tdr-two-ended': 'TDR from both ends',
  'murray-loop': 'Murray loop',
  'varley-loop': 'Varley loop',
  capacitance: 'Capacitance',
  'loop-resistance': 'Loop resistance',
};

/** Located against found for one method, over every close-out (or those on one cable type). */
export interface MethodAccuracyRow {
  method: ScoredMethod;
  label: string;
  /** Null on the row that takes every cable type together. */
  cableType: { id: number; name: string } | null;
  count: number;
  /** Mean of located − found, metres of cable from the method's own end: its lean. */
  meanErrorM: number;
  meanAbsErrorM: number;
  /** The largest miss either way. */
  maxAbsErrorM: number;
  /** How many found positions fell inside the method's 95 % window. */
  withinWindow: number;
}

/** One method's estimate of a closed-out fault against where it was found. */
export interface MethodScoreView {
  method: ScoredMethod;
  label: string;
  fromEnd: 'A' | 'B';
  used: boolean;
  locatedFromEndM: number;
  standardUncertaintyM: number;
  foundFromEndM: number;
  errorM: number;
  withinWindow: boolean;
}
