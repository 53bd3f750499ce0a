import 'fake-indexeddb/auto';
import { http, HttpResponse } from 'msw';
import { setupServer } from 'msw/node';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { IDEMPOTENCY_KEY } from '../../shared/schemas/traces';
import { openDeviceDb, outboxStore, type DeviceDb } from '../../src/features/offline/device-db';
import type { DecisionItem } from '../../src/features/offline/outbox-machine';
import { recoverOutbox, syncOutbox } from '../../src/features/offline/outbox-sync';
import { browserTransport } from '../../src/features/offline/outbox-transport';
import { at, decision, OPEN_AT_400, T0, upload } from '../unit/offline/outbox-items';

/** What reached the server's findings address: the key and body of every try. */
let seen: Array<{ key: string | null; body: unknown }> = [];
/** How the next tries are answered, in order; `lost` is a request that arrives but whose answer never comes back. */
let answers: Array<'lost' | 'created'> = [];

const server = setupServer(
  http.get('*/api/auth/csrf', () => HttpResponse.json({ csrfToken: 'token-1' })),
  http.post('*/api/findings', async ({ request }) => {
    seen.push({ key: request.headers.get('idempotency-key'), body: await request.json() });
    const next = answers.shift() ?? 'created';
    return next === 'lost' ? HttpResponse.error() : HttpResponse.json({ id: 41 }, { status: 201 });
  }),
);

let db: DeviceDb;
beforeAll(() => server.listen({ onUnhandledRequest: 'error' }));
afterEach(() => {
  server.resetHandlers();
  db?.close();
  seen = [];
  answers = [];
});
afterAll(() => server.close());

/** An upload the server already has (trace 12, one open at 400 m) and a decision about its event, ready to go. */
async function readyDecision(id: string): Promise<{ store: ReturnType<typeof outboxStore>; item: DecisionItem }> {
  db = await openDeviceDb(`rholog-key-${Math.random()}`);
  const store = outboxStore(db);
  const sent = upload({
    state: 'sent',
    bytes: null,
    sentAt: T0.toISOString(),
    result: { traceId: 12, alreadyThere: false, traceStatus: 'ok', events: [OPEN_AT_400] },
  });
  const item = decision(sent, { id, target: { traceId: 12, eventIndex: 0 } });
  await store.put(sent);
  await store.put(item);
  return { store, item };
}

describe('a decision sent from the outbox', () => {
  it('goes with an Idempotency-Key made from its id and keeps it when a lost answer makes it go again', async () => {
    const { store, item } = await readyDecision('3f1c9a52-7b0e-4d1a-9c6e-2a8b5d0e4f17');
    answers = ['lost', 'created'];
    const first = await syncOutbox(store, browserTransport, 7, { now: () => at(100) });
    expect(first.sent).toBe(0);
    expect(first.problem?.code).toBe('network');
    expect((await store.get(item.id))!.state).toBe('failed');
    const second = await syncOutbox(store, browserTransport, 7, { manual: true, now: () => at(110) });
    expect(second).toEqual({ sent: 1, problem: null });
    expect(seen.map((s) => s.key)).toEqual([
      'decision-3f1c9a52-7b0e-4d1a-9c6e-2a8b5d0e4f17',
      'decision-3f1c9a52-7b0e-4d1a-9c6e-2a8b5d0e4f17',
    ]);
    expect(seen[0].key).toMatch(IDEMPOTENCY_KEY);
    expect(seen[1].body).toEqual({ traceId: 12, eventIndex: 0, status: 'confirmed', kind: 'open-conductor', note: 'Found from the pit at MH-2' });
    const done = (await store.get(item.id)) as DecisionItem;
    expect(done.state).toBe('sent');
    expect(done.result).toEqual({ findingId: 41, alreadyDecided: false });
  });

  it('sends the same key again after the app was closed in the middle of the send', async () => {
    const { store, item } = await readyDecision('9d27e0b4-51aa-4c3f-8e62-0f4b7c1d2e93');
    // The app was killed while this try was out: the item is still marked "sending" in the store.
    await store.put({ ...item, state: 'sending', attempts: 1, lastAttemptAt: at(50).toISOString() });
    expect(await recoverOutbox(store)).toBe(1);
    await syncOutbox(store, browserTransport, 7, { now: () => at(60) });
    expect(seen.map((s) => s.key)).toEqual(['decision-9d27e0b4-51aa-4c3f-8e62-0f4b7c1d2e93']);
    expect(((await store.get(item.id)) as DecisionItem).result).toEqual({ findingId: 41, alreadyDecided: false });
  });

  it('gives two decisions two keys', async () => {
    const { store, item } = await readyDecision('0a6b2c8d-1e3f-4a5b-8c7d-9e0f1a2b3c4d');
    const other = decision((await store.get(item.uploadId)) as never, { id: '5e4d3c2b-1a09-4f8e-9d7c-6b5a4f3e2d1c', target: { traceId: 12, eventIndex: 0 } });
    await store.put(other);
    await syncOutbox(store, browserTransport, 7, { now: () => at(200) });
    expect(seen.map((s) => s.key)).toEqual(['decision-0a6b2c8d-1e3f-4a5b-8c7d-9e0f1a2b3c4d', 'decision-5e4d3c2b-1a09-4f8e-9d7c-6b5a4f3e2d1c']);
  });
});
