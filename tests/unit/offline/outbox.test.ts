import 'fake-indexeddb/auto';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import {
  openDeviceDb,
  outboxStore,
  forgetUser,
  saveFieldData,
  fieldDataFor,
  type DeviceDb,
  type OutboxStore,
} from '../../../src/features/offline/device-db';
import {
  bindDecision,
  isDue,
  matchServerEvent,
  recoverInterrupted,
  resumeAfterSignIn,
  retry,
  retryDelayMs,
  settleDecision,
  settleUpload,
  startSending,
  type Answer,
  type DecisionItem,
  type DeviceEvent,
  type UploadItem,
} from '../../../src/features/offline/outbox-machine';
import { recoverOutbox, syncOutbox, type Transport } from '../../../src/features/offline/outbox-sync';
import { at, decision, OPEN_AT_400, T0, upload } from './outbox-items';

const created = (traceId: number, events: DeviceEvent[], replayed = false): Answer => ({
  kind: 'http',
  status: 201,
  body: { traces: [{ id: traceId, status: 'ok', analysis: { events } }], duplicates: [], replayed },
});
const error = (status: number, code: string, message: string, extra: object = {}): Answer => ({
  kind: 'http',
  status,
  body: { error: { code, message, ...extra } },
});
const noNetwork: Answer = { kind: 'network', message: 'Could not reach Rholog.' };

describe('the outbox state machine', () => {
  it('goes queued → sending → sent on the server’s 201, keeps the trace it became and drops the raw bytes', () => {
    const item = upload();
    expect(isDue(item, T0)).toBe(true);
    const sending = startSending(item, T0);
    expect(sending.state).toBe('sending');
    expect(sending.attempts).toBe(1);
    const sent = settleUpload(sending, created(41, [OPEN_AT_400]), at(2));
    expect(sent.state).toBe('sent');
    expect(sent.sentAt).toBe('2031-05-14T08:00:02.000Z');
    expect(sent.result).toEqual({ traceId: 41, alreadyThere: false, traceStatus: 'ok', events: [OPEN_AT_400] });
    expect(sent.bytes).toBeNull();
    expect(sent.key).toBe(item.key);
    expect(isDue(sent, at(60), true)).toBe(false);
    expect(() => startSending(sent, at(3))).toThrow(/sent/);
  });

  it('takes a replayed answer, a duplicate and a stored-but-unreadable file as sent, naming the trace', () => {
    const replay = settleUpload(startSending(upload(), T0), created(41, [OPEN_AT_400], true), T0);
    expect(replay.result).toMatchObject({ traceId: 41, alreadyThere: true });
    const dup = settleUpload(
      startSending(upload(), T0),
      error(409, 'duplicate_upload', 'pole.csv was already uploaded', {
        duplicates: [{ originalName: 'pole.csv', traceId: 12, uploadedAt: '2031-05-13T10:00:00Z' }],
      }),
      T0,
    );
    expect(dup.state).toBe('sent');
    expect(dup.result).toEqual({ traceId: 12, alreadyThere: true, traceStatus: 'ok', events: null });
    const unreadable = settleUpload(
      startSending(upload(), T0),
      error(422, 'trace_unreadable', 'pole.csv could not be read', { traces: [{ id: 13, status: 'failed', analysis: null }] }),
      T0,
    );
    expect(unreadable.state).toBe('sent');
    expect(unreadable.result).toEqual({ traceId: 13, alreadyThere: false, traceStatus: 'failed', events: [] });
  });

  it('fails without a network, waits 5 s, then 10 s, and at most 5 min before trying again by itself', () => {
    const first = settleUpload(startSending(upload(), T0), noNetwork, T0);
    expect(first.state).toBe('failed');
    expect(first.problem).toEqual({ code: 'network', message: 'Could not reach Rholog.', status: 0, retryable: true });
    expect(first.nextAttemptAt).toBe(at(5).toISOString());
    expect(isDue(first, at(4))).toBe(false);
    expect(isDue(first, at(4), true)).toBe(true);
    expect(isDue(first, at(5))).toBe(true);
    const second = settleUpload(startSending(first, at(5)), noNetwork, at(5));
    expect(second.attempts).toBe(2);
    expect(second.nextAttemptAt).toBe(at(15).toISOString());
    // 5 s · 2^(n−1): 5, 10, 20, 40, 80, 160, then capped at 300 s.
    expect([1, 2, 3, 4, 5, 6, 7, 12].map(retryDelayMs)).toEqual([
      5_000, 10_000, 20_000, 40_000, 80_000, 160_000, 300_000, 300_000,
    ]);
  });

  it('treats a server fault as worth retrying and a refused request as not, until "Try again"', () => {
    const fault = settleUpload(startSending(upload(), T0), error(503, 'database_busy', 'The database is busy.'), T0);
    expect(fault.state).toBe('failed');
    expect(fault.problem?.retryable).toBe(true);
    const gone = settleUpload(startSending(upload(), T0), error(422, 'no_such_cable_run', 'There is no cable run 3.'), T0);
    expect(gone.state).toBe('failed');
    expect(gone.problem).toEqual({
      code: 'no_such_cable_run',
      message: 'There is no cable run 3.',
      status: 422,
      retryable: false,
    });
    expect(isDue(gone, at(3600), true)).toBe(false);
    const again = retry(gone);
    expect(again.state).toBe('queued');
    expect(isDue(again, T0)).toBe(true);
  });

  it('waits for sign-in on a 401 and resumes only for its own owner', () => {
    const item = settleUpload(startSending(upload(), T0), error(401, 'unauthenticated', 'Sign in first.'), T0);
    expect(item.state).toBe('sign-in');
    expect(item.problem?.message).toMatch(/Sign in again/);
    expect(isDue(item, at(600), true)).toBe(false);
    expect(resumeAfterSignIn(item, 8)).toBe(item);
    const resumed = resumeAfterSignIn(item, 7);
    expect(resumed.state).toBe('queued');
    expect(resumed.problem).toBeNull();
  });

  it('keeps an item the server refuses (403) on the phone with the server’s reason', () => {
    const item = settleUpload(
      startSending(upload(), T0),
      error(403, 'forbidden', 'Your role (planner) does not allow this: it needs "traces:upload".'),
      T0,
    );
    expect(item.state).toBe('refused');
    expect(item.problem?.message).toBe('Your role (planner) does not allow this: it needs "traces:upload".');
    expect(item.bytes).not.toBeNull();
    expect(isDue(item, at(600), true)).toBe(false);
  });

  it('puts an item the app was killed while sending back in the queue with the same key', () => {
    const sending = startSending(upload(), T0);
    const recovered = recoverInterrupted(sending);
    expect(recovered.state).toBe('queued');
    expect(recovered.key).toBe(sending.key);
    const sent = settleUpload(startSending(recovered, at(1)), created(5, []), at(1));
    expect(recoverInterrupted(sent)).toBe(sent);
  });

  it('places a decision made on the phone on the server’s event of the same type within its window', () => {
    // The server found a splice the phone did not, so the open is its event 1, 0.8 m away from the phone's reading.
    const server: DeviceEvent[] = [
      { index: 0, type: 'impedance-drop', distanceM: 120.4, windowStartM: 119, windowEndM: 122 },
      { index: 1, type: 'open', distanceM: 400.8, windowStartM: 396.8, windowEndM: 404.8 },
      { index: 2, type: 'open', distanceM: 801.6, windowStartM: 793, windowEndM: 810 },
    ];
    expect(matchServerEvent(OPEN_AT_400, server)?.index).toBe(1);
    expect(matchServerEvent(OPEN_AT_400, [{ ...server[1], distanceM: 404.5 }])).toBeNull();
    expect(matchServerEvent(OPEN_AT_400, [{ ...server[1], type: 'short' }])).toBeNull();

    const up = settleUpload(startSending(upload(), T0), created(41, server), T0);
    const bound = bindDecision(decision(up), up);
    expect(bound.target).toEqual({ traceId: 41, eventIndex: 1 });
    const moved = bindDecision(decision(up), { ...up, result: { ...up.result!, events: [{ ...server[1], distanceM: 430 }] } });
    expect(moved.state).toBe('failed');
    expect(moved.problem?.code).toBe('event_moved');
    expect(moved.problem?.retryable).toBe(false);
  });

  it('takes a 201 and an "already decided" answer to a decision as sent, with the finding', () => {
    const up = settleUpload(startSending(upload(), T0), created(41, [OPEN_AT_400]), T0);
    const bound = bindDecision(decision(up), up);
    const sent = settleDecision(
      startSending(bound, T0),
      { kind: 'http', status: 201, body: { id: 77, status: 'confirmed' } },
      T0,
    );
    expect(sent.state).toBe('sent');
    expect(sent.result).toEqual({ findingId: 77, alreadyDecided: false });
    const twice = settleDecision(
      startSending(bound, T0),
      error(409, 'already_decided', 'Event 0 of this trace was already confirmed (finding 77)', { findingId: 77 }),
      T0,
    );
    expect(twice.result).toEqual({ findingId: 77, alreadyDecided: true });
  });
});

/**
 * The server as the outbox meets it: one trace per idempotency key, a session
 * that can end, and a network that can cut an answer off after the server
 * has acted on the request.
 */
class Server implements Transport {
  traces = new Map<string, { id: number; events: DeviceEvent[] }>();
  findings = new Map<string, number>();
  keysSeen: string[] = [];
  signedIn = true;
  /** The next answer is lost on the way back (the request itself arrives). */
  loseNextAnswer = false;
  down = false;
  events: DeviceEvent[] = [OPEN_AT_400];
  nextId = 100;

  private reply(answer: Answer): Answer {
    if (this.loseNextAnswer) {
      this.loseNextAnswer = false;
      return noNetwork;
    }
    return answer;
  }
  async upload(item: UploadItem): Promise<Answer> {
    if (this.down) return noNetwork;
    if (!this.signedIn) return error(401, 'unauthenticated', 'Sign in first.');
    this.keysSeen.push(item.key);
    const earlier = this.traces.get(item.key);
    const trace = earlier ?? { id: this.nextId++, events: this.events };
    this.traces.set(item.key, trace);
    return this.reply(created(trace.id, trace.events, !!earlier));
  }
  async decide(item: DecisionItem): Promise<Answer> {
    if (this.down) return noNetwork;
    if (!this.signedIn) return error(401, 'unauthenticated', 'Sign in first.');
    const key = `${item.target!.traceId}:${item.target!.eventIndex}`;
    const earlier = this.findings.get(key);
    if (earlier) return this.reply(error(409, 'already_decided', 'already decided', { findingId: earlier }));
    const id = this.nextId++;
    this.findings.set(key, id);
    return this.reply({ kind: 'http', status: 201, body: { id } });
  }
  async trace(traceId: number): Promise<Answer> {
    const t = [...this.traces.values()].find((x) => x.id === traceId);
    return t
      ? { kind: 'http', status: 200, body: { id: t.id, status: 'ok', analysis: { events: t.events } } }
      : error(404, 'not_found', 'no trace');
  }
}

describe('syncing the outbox kept in IndexedDB', () => {
  let db: DeviceDb;
  let store: OutboxStore;
  let server: Server;
  beforeEach(async () => {
    db = await openDeviceDb(`rholog-test-${Math.random()}`);
    store = outboxStore(db);
    server = new Server();
  });
  afterEach(() => db.close());

  it('stores one trace when the answer to the first send is lost and the send is tried again', async () => {
    const item = upload();
    await store.put(item);
    server.loseNextAnswer = true;
    const first = await syncOutbox(store, server, 7, { now: () => T0 });
    expect(first).toEqual({
      sent: 0,
      problem: { code: 'network', message: 'Could not reach Rholog.', status: 0, retryable: true },
    });
    expect((await store.get(item.id))!.state).toBe('failed');
    expect(server.traces.size).toBe(1);
    // Not due yet by itself; "Try again" sends now.
    expect((await syncOutbox(store, server, 7, { now: () => at(1) })).sent).toBe(0);
    const second = await syncOutbox(store, server, 7, { now: () => at(2), manual: true });
    expect(second).toEqual({ sent: 1, problem: null });
    const done = (await store.get(item.id)) as UploadItem;
    expect(done.state).toBe('sent');
    expect(done.result).toMatchObject({ traceId: 100, alreadyThere: true });
    expect(server.keysSeen).toEqual([item.key, item.key]);
    expect(server.traces.size).toBe(1);
  });

  it('waits for sign-in with everything of that owner, leaves another account’s items alone, and sends after sign-in', async () => {
    const a = upload();
    const b = upload();
    const other = upload({ userId: 9, userName: 'Sol Super' });
    for (const i of [a, b, other]) await store.put(i);
    server.signedIn = false;
    const report = await syncOutbox(store, server, 7, { now: () => T0 });
    expect(report.problem?.status).toBe(401);
    expect((await store.list()).map((i) => [i.id, i.state])).toEqual([
      [a.id, 'sign-in'],
      [b.id, 'sign-in'],
      [other.id, 'queued'],
    ]);
    expect(server.keysSeen).toEqual([]);
    server.signedIn = true;
    for (const i of await store.list()) await store.put(resumeAfterSignIn(i, 7));
    expect(await syncOutbox(store, server, 7, { now: () => at(1) })).toEqual({ sent: 2, problem: null });
    expect(server.keysSeen).toEqual([a.key, b.key]);
    expect((await store.get(other.id))!.state).toBe('queued');
  });

  it('sends again, under the same key, what a killed app left half-sent', async () => {
    const item = startSending(upload(), T0);
    await store.put(item);
    await server.upload(item); // the server got it; the app died before the answer
    expect(await recoverOutbox(store)).toBe(1);
    expect((await store.get(item.id))!.state).toBe('queued');
    expect((await syncOutbox(store, server, 7, { now: () => at(1) })).sent).toBe(1);
    expect(server.traces.size).toBe(1);
  });

  it('stops at the first item when there is no network and keeps the order for the next pass', async () => {
    const a = upload();
    const b = upload();
    await store.put(b);
    await store.put(a);
    server.down = true;
    await syncOutbox(store, server, 7, { now: () => T0 });
    expect((await store.list()).map((i) => [i.id, i.state])).toEqual([
      [a.id, 'failed'],
      [b.id, 'queued'],
    ]);
    server.down = false;
    await syncOutbox(store, server, 7, { now: () => at(10) });
    expect(server.keysSeen).toEqual([a.key, b.key]);
  });

  it('sends a fault confirmed offline after its trace, on the server’s event', async () => {
    server.events = [
      { index: 0, type: 'impedance-drop', distanceM: 120.4, windowStartM: 119, windowEndM: 122 },
      { ...OPEN_AT_400, index: 1 },
    ];
    const up = upload();
    const d = decision(up);
    await store.put(up);
    await store.put(d);
    server.loseNextAnswer = false;
    expect(await syncOutbox(store, server, 7, { now: () => T0 })).toEqual({ sent: 2, problem: null });
    const sent = (await store.get(d.id)) as DecisionItem;
    expect(sent.target).toEqual({ traceId: 100, eventIndex: 1 });
    expect(sent.result).toEqual({ findingId: 101, alreadyDecided: false });
  });

  it('reads the server’s events for a file it already had before placing the decision', async () => {
    server.traces.set('earlier-key', { id: 55, events: [OPEN_AT_400] });
    const up = settleUpload(
      startSending(upload(), T0),
      error(409, 'duplicate_upload', 'already uploaded', {
        duplicates: [{ originalName: 'x.csv', traceId: 55, uploadedAt: T0.toISOString() }],
      }),
      T0,
    );
    const d = decision(up);
    await store.put(up);
    await store.put(d);
    expect((await syncOutbox(store, server, 7, { now: () => T0 })).sent).toBe(1);
    expect(((await store.get(up.id)) as UploadItem).result?.events).toEqual([OPEN_AT_400]);
    expect(((await store.get(d.id)) as DecisionItem).target).toEqual({ traceId: 55, eventIndex: 0 });
  });
});

describe('the field data and signing out', () => {
  let db: DeviceDb;
  beforeEach(async () => {
    db = await openDeviceDb(`rholog-test-${Math.random()}`);
  });
  afterEach(() => db.close());

  it('keeps one account’s field data only, and signing out clears it and, if asked, the unsent items', async () => {
    await saveFieldData(db, { userId: 7, savedAt: T0.toISOString(), sites: [], runs: [], cables: [] });
    await saveFieldData(db, { userId: 9, savedAt: T0.toISOString(), sites: [], runs: [], cables: [] });
    expect(await fieldDataFor(db, 7)).toBeNull();
    expect((await fieldDataFor(db, 9))?.userId).toBe(9);

    const store = outboxStore(db);
    const mine = upload({ userId: 9 });
    const sent = { ...upload({ userId: 9 }), state: 'sent' as const };
    const theirs = upload({ userId: 7 });
    for (const i of [mine, sent, theirs]) await store.put(i);
    await forgetUser(db, 9, { dropUnsent: false });
    expect(await fieldDataFor(db, 9)).toBeNull();
    expect((await store.list()).map((i) => i.id)).toEqual([mine.id, theirs.id]);
    await forgetUser(db, 9, { dropUnsent: true });
    expect((await store.list()).map((i) => i.id)).toEqual([theirs.id]);
  });
});
