import { DEVICE_SUMMARY_MAX_EVENTS, type DeviceAnalysis } from '../schemas/device-analysis';
import type { ReflectionType, TraceAnalysis } from '../schemas/trace-analysis';

/** Distances in the summary are kept to the millimetre; a difference of one rounding step is no difference. */
const STEP_M = 0.001;
const mm = (m: number) => Math.round(m * 1000) / 1000;

/**
 * The summary a phone sends with an upload it analysed itself: the engine
 * version and library values it used, and where it put the first events.
 */
export function summariseDeviceAnalysis(
  analysis: TraceAnalysis,
  opts: { analysedAt: Date; cableTypeRevision: number | null },
): DeviceAnalysis {
  return {
    engineVersion: analysis.engineVersion,
    analysedAt: opts.analysedAt.toISOString(),
    vf: analysis.vf,
    vfTolerance: analysis.vfTolerance,
    z0Ohm: analysis.z0Ohm,
    cableTypeRevision: opts.cableTypeRevision,
    eventCount: analysis.events.length,
    events: analysis.events.slice(0, DEVICE_SUMMARY_MAX_EVENTS).map((e) => ({
      index: e.index,
      type: e.type,
      distanceM: mm(e.distanceM),
      windowStartM: mm(e.windowStartM),
      windowEndM: mm(e.windowEndM),
    })),
  };
}

export interface EventDifference {
  index: number;
  device: { type: ReflectionType; distanceM: number } | null;
  server: { type: ReflectionType; distanceM: number } | null;
}

/** Where the phone's analysis and the server's part, item by item; `same` when nothing does. */
export interface DeviceComparison {
  same: boolean;
  engine: { device: string; server: string } | null;
  vf: { device: number; server: number } | null;
  vfTolerance: { device: number; server: number } | null;
  eventCount: { device: number; server: number } | null;
  /** Events (of the first the summary holds) whose type or distance differ, or that only one side found. */
  events: EventDifference[];
}

/**
 * Compare what the phone found with the server's analysis of the same file.
 * They differ when the library's values changed while the phone was offline,
 * or when the phone ran another engine version.
 */
export function compareWithServer(
  device: DeviceAnalysis,
  server: Pick<TraceAnalysis, 'engineVersion' | 'vf' | 'vfTolerance' | 'events'>,
): DeviceComparison {
  const pair = <T>(a: T, b: T, differ: boolean) => (differ ? { device: a, server: b } : null);
  const events: EventDifference[] = [];
  const shown = Math.min(DEVICE_SUMMARY_MAX_EVENTS, Math.max(device.eventCount, server.events.length));
  for (let i = 0; i < shown; i++) {
    const d = device.events[i];
    const s = server.events[i];
    if (!d && !s) continue;
    const moved = !d || !s || d.type !== s.type || Math.abs(d.distanceM - s.distanceM) > STEP_M * 1.5;
    if (moved) {
      events.push({
        index: i,
        device: d ? { type: d.type, distanceM: d.distanceM } : null,
        server: s ? { type: s.type, distanceM: s.distanceM } : null,
      });
    }
  }
  const result = {
    engine: pair(device.engineVersion, server.engineVersion, device.engineVersion !== server.engineVersion),
    vf: pair(device.vf, server.vf, device.vf !== server.vf),
    vfTolerance: pair(device.vfTolerance, server.vfTolerance, device.vfTolerance !== server.vfTolerance),
    eventCount: pair(device.eventCount, server.events.length, device.eventCount !== server.events.length),
    events,
  };
  return { same: !result.engine && !result.vf && !result.vfTolerance && !result.eventCount && events.length === 0, ...result };
}
