import { describe, expect, it } from 'vitest';
import {
  bindDecision,
  isDue,
  settleUpload,
  startSending,
  withServerEvents,
  type Answer,
} from '../../../src/features/offline/outbox-machine';
import { decision as makeDecision, OPEN_AT_400, T0, upload as makeUpload } from './outbox-items';

/** A large file sent from the phone is answered 202: stored, analysed on the server later. */
const upload = makeUpload({ fileName: 'long-shot.csv' });
const decision = makeDecision(upload, { note: null });

const accepted: Answer = {
  kind: 'http',
  status: 202,
  body: { traces: [{ id: 77, status: 'pending', analysis: null }], duplicates: [], replayed: false },
};

describe('an upload the server answers 202 (analysed in the background)', () => {
  it('counts as delivered, drops the bytes, and leaves the server’s events unknown for now', () => {
    const sent = settleUpload(startSending(upload, T0), accepted, T0);
    expect(sent.state).toBe('sent');
    expect(sent.bytes).toBeNull();
    expect(sent.result).toEqual({ traceId: 77, alreadyThere: false, traceStatus: 'pending', events: null });
    expect(isDue(sent, T0, true)).toBe(false);
  });

  it('keeps a decision made on the phone waiting while the trace is pending, then places it on the analysed event', () => {
    const sent = settleUpload(startSending(upload, T0), accepted, T0);
    // Read back while still pending: no events yet, and the decision is neither failed nor due.
    const stillPending = withServerEvents(sent, { id: 77, status: 'pending', analysis: null });
    expect(stillPending.result).toEqual({ traceId: 77, alreadyThere: false, traceStatus: 'pending', events: null });
    const waiting = bindDecision(decision, stillPending);
    expect(waiting).toBe(decision);
    expect(isDue(waiting, T0, true)).toBe(false);
    // Analysed: the events arrive and the decision binds to the open of the same type within its window.
    const analysed = withServerEvents(stillPending, {
      id: 77,
      status: 'ok',
      analysis: { events: [{ ...OPEN_AT_400, index: 2, distanceM: 400.6 }] },
    });
    const bound = bindDecision(decision, analysed);
    expect(bound.target).toEqual({ traceId: 77, eventIndex: 2 });
    expect(isDue(bound, T0)).toBe(true);
  });

  it('fails the decision with the reason when the background analysis could not read the file', () => {
    const sent = settleUpload(startSending(upload, T0), accepted, T0);
    const failed = withServerEvents(sent, { id: 77, status: 'failed', analysis: null });
    const d = bindDecision(decision, failed);
    expect([d.state, d.problem?.code, d.problem?.retryable]).toEqual(['failed', 'trace_failed', false]);
  });
});
