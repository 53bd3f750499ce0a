import { z } from 'zod';

/** The kinds of reflection event the engine reports. */
export const reflectionTypeSchema = z.enum(['open', 'short', 'impedance-rise', 'impedance-drop']);
export type ReflectionType = z.infer<typeof reflectionTypeSchema>;

export const traceModeSchema = z.enum(['step', 'pulse']);
export type TraceMode = z.infer<typeof traceModeSchema>;

export const traceWarningSchema = z.object({
  code: z.string(),
  message: z.string(),
});
export type TraceWarning = z.infer<typeof traceWarningSchema>;

export const reflectionEventSchema = z.object({
  index: z.number().int().nonnegative(),
  /** Round-trip time from the launch to the event's onset. */
  roundTripNs: z.number(),
  distanceM: z.number(),
  /** Half-width of the window the fault is expected in. */
  uncertaintyM: z.number().nonnegative(),
  windowStartM: z.number(),
  windowEndM: z.number(),
  /**
   * The event's own reflection coefficient: the height read at the instrument referred to
   * the wave that reached the event (past earlier faults and, where modelled, the cable's
   * loss), in [−1, 1].
   */
  reflectionCoefficient: z.number(),
  /** The height as read from the trace against the launch, before any correction. */
  reflectionCoefficientRaw: z.number().optional(),
  /** True when `reflectionCoefficient` is corrected for the cable's loss. */
  lossCorrected: z.boolean().optional(),
  /** How many dB the cable's loss had lowered this event's reading: 20·log10 of the corrected over the raw height. */
  pathLossDb: z.number().nullable().optional(),
  /** Standard uncertainties behind the window, metres (uncertaintyM is COVERAGE_FACTOR times their root-sum-square). */
  uncertaintyBudget: z
    .object({
      vfM: z.number().nonnegative(),
      samplingM: z.number().nonnegative(),
      timingM: z.number().nonnegative(),
      lossM: z.number().nonnegative(),
      dispersionM: z.number().nonnegative(),
      combinedM: z.number().nonnegative(),
    })
    .optional(),
  /** The event lies inside the launch's blind zone but stands out of it; its reading is less certain. */
  insideBlindZone: z.boolean().optional(),
  /** Z = Z0 (1 + ρ) / (1 − ρ); step traces with a known Z0 only. */
  impedanceOhm: z.number().nullable(),
  type: reflectionTypeSchema,
  isCableEnd: z.boolean(),
  /** Index of the earlier event this one is probably an echo of. */
  likelyMultipleOf: z.number().int().nonnegative().nullable(),
  /** Peak deviation from the local baseline, in the trace's amplitude unit. */
  amplitude: z.number(),
  /** Event size over the detector's noise level. */
  snr: z.number().nonnegative(),
  /** 10–90 % duration of the event's edge (step) or its width (pulse). */
  riseTimeNs: z.number().nonnegative(),
});
export type ReflectionEvent = z.infer<typeof reflectionEventSchema>;

export const traceAnalysisSchema = z.object({
  engineVersion: z.string(),
  mode: traceModeSchema,
  modeDetected: z.boolean(),
  amplitudeUnit: z.enum(['V', 'rho']),
  launch: z.object({
    indexSample: z.number().int().nonnegative(),
    timeNs: z.number(),
    amplitude: z.number(),
    /** False when the trace holds no launch edge and time zero is the reference plane. */
    foundInTrace: z.boolean(),
  }),
  /** Standard deviation of the noise, in the trace's amplitude unit. */
  noiseLevel: z.number().nonnegative(),
  /** Incident step level (step) or launch pulse height (pulse), in the trace's amplitude unit. */
  incidentLevel: z.number(),
  vf: z.number().positive(),
  vfTolerance: z.number().nonnegative(),
  z0Ohm: z.number().positive().nullable(),
  sampleIntervalNs: z.number().positive(),
  pulseWidthNs: z.number().nonnegative().nullable(),
  riseTimeNs: z.number().nonnegative().nullable(),
  zeroOffsetNs: z.number(),
  leadLengthM: z.number(),
  blindZoneM: z.number().nonnegative(),
  rangeM: z.number().nonnegative(),
  /** How events were told from noise: the target rate of false events per trace and the threshold it sets. */
  detection: z
    .object({
      falseEventsPerTrace: z.number().nonnegative(),
      /** Threshold, in noise standard deviations of the step filter. */
      thresholdSigma: z.number().positive(),
      /** Independent filter outputs tested over the record. */
      independentTests: z.number().nonnegative(),
    })
    .optional(),
  /** Coverage the uncertainty windows are stated at (e.g. 0.95). */
  windowCoverage: z.number().min(0).max(1).optional(),
  /** Where the cable loss the events were fitted with came from: the cable library, estimated from this trace, or none. */
  lossSource: z.enum(['library', 'estimated', 'none']).optional(),
  /** For an estimated loss, what in the trace it was read from: the rise of the incident step, the shape of the reflections' edges. */
  lossEstimatedFrom: z.array(z.enum(['incident-step', 'edge-shape'])).optional(),
  /** That loss, as attenuation at a few frequencies (dB per 100 m). */
  lossDbPer100m: z.array(z.object({ frequencyHz: z.number().positive(), dbPer100m: z.number().nonnegative() })).optional(),
  events: z.array(reflectionEventSchema),
  warnings: z.array(traceWarningSchema),
});
export type TraceAnalysis = z.infer<typeof traceAnalysisSchema>;
