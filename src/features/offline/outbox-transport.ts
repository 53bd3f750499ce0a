/**
 * The outbox's own way to the server. It does not go through the app's API
 * client, which sends people to the sign-in page on a 401: a sync running in
 * the background only records that sign-in is needed and waits.
 */
import { decisionKey, type Answer, type DecisionItem, type UploadItem } from './outbox-machine';
import type { Transport } from './outbox-sync';

const NO_NETWORK = 'Could not reach Rholog: no signal, or the server did not answer.';

/** A token for this session's phase; the server hands back the cookie's own while it is still valid. */
async function csrfToken(): Promise<string> {
  const res = await fetch('/api/auth/csrf', { credentials: 'same-origin', headers: { accept: 'application/json' } });
  return ((await res.json()) as { csrfToken: string }).csrfToken;
}

async function call(
  path: string,
  init: Omit<RequestInit, 'headers'> & { headers?: Record<string, string> } = {},
  retried = false,
): Promise<Answer> {
  let res: Response;
  try {
    const headers: Record<string, string> = { accept: 'application/json', ...init.headers };
    if (init.method && init.method !== 'GET') headers['x-csrf-token'] = await csrfToken();
    res = await fetch(path, { ...init, headers, credentials: 'same-origin' });
  } catch {
    return { kind: 'network', message: NO_NETWORK };
  }
  let body: unknown = null;
  try {
    body = await res.json();
  } catch {
    // A proxy's HTML page or an empty answer: the status says enough.
  }
  const code = (body as { error?: { code?: string } } | null)?.error?.code;
  // A token from before the session ended: fetch a fresh one once, so the real answer (often 401) comes through.
  if (res.status === 403 && code === 'csrf_invalid' && !retried) return call(path, init, true);
  return { kind: 'http', status: res.status, body };
}

export const browserTransport: Transport = {
  upload(item: UploadItem) {
    if (!item.bytes)
      return Promise.resolve({
        kind: 'http',
        status: 410,
        body: { error: { code: 'file_gone', message: 'The file is no longer on this phone.' } },
      });
    const form = new FormData();
    for (const [k, v] of Object.entries(item.fields)) if (v !== '') form.append(k, v);
    if (item.summary) form.append('deviceAnalysis', JSON.stringify(item.summary));
    form.append('file', new Blob([item.bytes], { type: 'text/csv' }), item.fileName);
    return call('/api/traces', { method: 'POST', body: form, headers: { 'Idempotency-Key': item.key } });
  },
  decide(item: DecisionItem) {
    const { traceId, eventIndex } = item.target!;
    return call('/api/findings', {
      method: 'POST',
      headers: { 'content-type': 'application/json', 'Idempotency-Key': decisionKey(item) },
      body: JSON.stringify({ traceId, eventIndex, status: item.status, kind: item.findingKind, note: item.note }),
    });
  },
  trace(traceId: number) {
    return call(`/api/traces/${traceId}?points=100`);
  },
};
