import type { DecisionItem, DeviceEvent, UploadItem } from '../../../src/features/offline/outbox-machine';

/** Outbox items as the phone stores them, for the outbox tests: each call makes a new one, numbered in order. */
export const T0 = new Date('2031-05-14T08:00:00Z');
export const at = (s: number) => new Date(T0.getTime() + s * 1000);

export const OPEN_AT_400: DeviceEvent = { index: 0, type: 'open', distanceM: 400.0, windowStartM: 396.0, windowEndM: 404.0 };

let n = 0;
export function upload(over: Partial<UploadItem> = {}): UploadItem {
  n++;
  return {
    kind: 'upload',
    id: `u${n}`,
    key: `device-upload-${String(n).padStart(4, '0')}`,
    userId: 7,
    userName: 'Tess Tech',
    createdAt: at(n).toISOString(),
    state: 'queued',
    attempts: 0,
    lastAttemptAt: null,
    nextAttemptAt: null,
    problem: null,
    sentAt: null,
    fileName: `pole-${n}.csv`,
    bytes: new TextEncoder().encode(`time_ns,voltage_V\n0,0.0${n}\n`).buffer as ArrayBuffer,
    sizeBytes: 24,
    fields: { cableRunId: '3', end: 'A', mode: 'auto' },
    where: { siteId: 1, siteName: 'Harrowmere North', cableRunId: 3, cableRunName: 'Feeder HN-3', end: 'A', endLabel: 'Bay 3' },
    analysis: null,
    deviceError: null,
    summary: null,
    result: null,
    ...over,
  };
}

export function decision(of: UploadItem, over: Partial<DecisionItem> = {}): DecisionItem {
  n++;
  return {
    kind: 'decision',
    id: `d${n}`,
    uploadId: of.id,
    userId: of.userId,
    userName: of.userName,
    createdAt: at(n).toISOString(),
    state: 'queued',
    attempts: 0,
    lastAttemptAt: null,
    nextAttemptAt: null,
    problem: null,
    sentAt: null,
    event: OPEN_AT_400,
    status: 'confirmed',
    findingKind: 'open-conductor',
    note: 'Found from the pit at MH-2',
    target: null,
    result: null,
    ...over,
  };
}

