import type { OutboxItem } from './outbox-machine';

/** An item's state in a few words, as the list and the status line say it; `viewerId` is who reads it. */
export function stateWords(item: OutboxItem, viewerId = item.userId): string {
  switch (item.state) {
    case 'queued':
      return item.kind === 'decision' && !item.target ? 'Waiting for its trace to be sent' : 'Waiting to send';
    case 'sending':
      return 'Sending…';
    case 'sent':
      return 'Sent';
    case 'failed':
      return item.problem?.retryable ? 'Not sent yet: will try again' : 'Not sent';
    case 'sign-in':
      return viewerId === item.userId ? 'Waiting for you to sign in' : `Waits for ${item.userName} to sign in`;
    case 'refused':
      return 'Refused by the server: kept on this phone';
  }
}

/** Decisions the server could not place: sending them again cannot help; the trace page is where to decide. */
const DECIDE_ON_TRACE_PAGE = new Set(['event_moved', 'trace_failed', 'upload_removed']);

/** Whether "Try again" can help this item. */
export function canTryAgain(item: OutboxItem): boolean {
  if (item.state === 'refused') return true;
  if (item.state !== 'failed') return false;
  return !(item.kind === 'decision' && DECIDE_ON_TRACE_PAGE.has(item.problem?.code ?? ''));
}

/** The server's trace of a decision's upload, once the upload is in. */
export function traceOfDecision(item: OutboxItem, all: OutboxItem[]): number | null {
  if (item.kind !== 'decision') return null;
  const up = all.find((u) => u.id === item.uploadId);
  return up?.kind === 'upload' ? (up.result?.traceId ?? null) : null;
}

/** What the item is, in one line. */
export function itemTitle(item: OutboxItem, uploads: OutboxItem[] = []): string {
  if (item.kind === 'upload') return item.fileName;
  const of = uploads.find((u) => u.id === item.uploadId);
  const verb = item.status === 'confirmed' ? 'Fault confirmed' : 'Event dismissed';
  return `${verb} at event ${item.event.index + 1}${of?.kind === 'upload' ? ` of ${of.fileName}` : ''}`;
}

export const TONE_OF: Record<OutboxItem['state'], 'info' | 'ok' | 'warn' | 'danger' | 'plain'> = {
  queued: 'info',
  sending: 'info',
  sent: 'ok',
  failed: 'danger',
  'sign-in': 'warn',
  refused: 'danger',
};

/** Let the person keep the raw file themselves (an administrator recovering another account's work, or anyone before removing it). */
export function saveFile(name: string, bytes: ArrayBuffer) {
  const url = URL.createObjectURL(new Blob([bytes], { type: 'text/csv' }));
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  a.click();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
