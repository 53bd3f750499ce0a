import { z } from 'zod';
import { reflectionTypeSchema } from './trace-analysis';

/**
 * What a phone made of a trace before it was uploaded: the engine version and
 * library values it used and where it put each event. It travels with the
 * upload as the `deviceAnalysis` form field (JSON text) and is kept with the
 * trace, so that a difference from the server's own analysis — the cable
 * library changed while the phone was offline, or the phone ran an older
 * engine — can be shown beside it.
 */

/** Events kept in the summary: the form field must stay under the upload's 2 KB field limit. */
export const DEVICE_SUMMARY_MAX_EVENTS = 12;
/** The longest JSON text accepted for the field. */
export const DEVICE_SUMMARY_MAX_CHARS = 2000;

const metres = (what: string) =>
  z
    .number({ error: `must be ${what} in metres` })
    .finite({ error: `must be ${what} in metres` })
    .min(-100_000)
    .max(1_000_000);

export const DeviceEventSchema = z
  .object({
    index: z.number({ error: 'must be an event number' }).int().min(0).max(100_000),
    type: reflectionTypeSchema,
    distanceM: metres('a distance'),
    windowStartM: metres('the window start'),
    windowEndM: metres('the window end'),
  })
  .strict();

export const DeviceAnalysisSchema = z
  .object({
    engineVersion: z
      .string({ error: 'must be the engine version' })
      .trim()
      .min(1, 'must be the engine version')
      .max(20, 'must be at most 20 characters'),
    analysedAt: z.iso.datetime({ error: 'must be a date and time (ISO 8601)' }),
    vf: z.number({ error: 'must be a velocity factor' }).gt(0, 'must be more than 0').max(1, 'must be at most 1'),
    vfTolerance: z.number({ error: 'must be a fraction' }).min(0, 'must not be negative').max(1, 'must be at most 1'),
    z0Ohm: z.number({ error: 'must be an impedance in ohms' }).positive('must be more than 0').max(10_000).nullable(),
    /** The library entry's revision the phone had; null when it did not know it. */
    cableTypeRevision: z.number().int().min(0).nullable(),
    /** Every event the phone found; `events` holds the first few of them. */
    eventCount: z.number({ error: 'must be a count' }).int().min(0).max(100_000),
    events: z
      .array(DeviceEventSchema, { error: 'must be a list of events' })
      .max(DEVICE_SUMMARY_MAX_EVENTS, `must have at most ${DEVICE_SUMMARY_MAX_EVENTS} events`),
  })
  .strict();
export type DeviceAnalysis = z.output<typeof DeviceAnalysisSchema>;

/** The multipart field: JSON text, empty or absent meaning "not analysed on a device". */
export const deviceAnalysisField = z
  .string({ error: 'must be JSON text' })
  .max(DEVICE_SUMMARY_MAX_CHARS, `must be at most ${DEVICE_SUMMARY_MAX_CHARS} characters`)
  .optional()
  .transform((text, ctx) => {
    if (text === undefined || text.trim() === '') return undefined;
    try {
      return JSON.parse(text) as unknown;
    } catch {
      ctx.addIssue({ code: 'custom', message: 'must be JSON text (the analysis made on the device)' });
      return z.NEVER;
    }
  })
  .pipe(DeviceAnalysisSchema.optional());
