import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Finding, Ticket, TicketEvent, TicketFinding, Trace } from '../../server/db/models';
import { stepTraceCsv } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';
import { supervisedRun } from './tickets.support';

/**
 * Many people writing at once: each request must succeed, once, with nothing
 * lost or doubled. SQLite takes one writer at a time; the server queues its
 * write transactions instead of letting them fail with "database is locked".
 */
let api: TestApi;
let fx: Awaited<ReturnType<typeof supervisedRun>>;
let tech: Client;
let sup: Client;

beforeAll(async () => {
  // Twenty uploads at once from one account: the per-person caps on uploads under way and files waiting
  // (uploads-at-once.test.ts, upload-waiting-cap.test.ts) are raised so that only the storage's concurrency is tested.
  api = await startApi({ uploadsAtOncePerUser: 100, analysisPendingPerUser: 100 });
  fx = await supervisedRun(api, 'Busy run');
  tech = await api.as('technician');
  sup = await api.as('supervisor');
});
afterAll(() => api?.close());

const filesUnder = (dir: string) =>
  fs.existsSync(dir) ? fs.readdirSync(dir, { recursive: true, withFileTypes: true }).filter((d) => d.isFile()).map((d) => path.join(d.parentPath, d.name)) : [];

let uploadedIds: number[] = [];

describe('POST /api/traces, 20 at once', () => {
  it('stores every upload once, each with its own file, and leaves nothing in the inbox', async () => {
    const before = await Trace.count();
    // Twenty different recordings: an open every 5 m from 40 m (distinct bytes, so none is a duplicate of another).
    const faults = Array.from({ length: 20 }, (_, i) => 40 + 5 * i);
    const responses = await Promise.all(
      faults.map((faultM) =>
        tech
          .postRaw('/api/traces')
          .field('cableRunId', String(fx.run.id))
          .field('end', 'A')
          .attach('file', Buffer.from(stepTraceCsv({ faultM, vf: 0.66 })), `open-${faultM}.csv`),
      ),
    );
    expect(responses.map((r) => r.status)).toEqual(faults.map(() => 201));
    uploadedIds = responses.map((r) => r.body.traces[0].id);
    expect(new Set(uploadedIds).size).toBe(20);
    expect(await Trace.count()).toBe(before + 20);
    const rows = await Trace.findAll({ where: { id: uploadedIds } });
    expect(rows.map((t) => t.originalName).sort()).toEqual(faults.map((f) => `open-${f}.csv`).sort());
    expect(rows.every((t) => t.status === 'ok')).toBe(true);
    // Each open found where it was put: d = VF·c·t/2 with the open placed at faultM (the file generator's formula).
    for (const r of responses) {
      const t = r.body.traces[0];
      const want = Number(/open-(\d+)\.csv/.exec(t.originalName)![1]);
      expect(t.analysis.events.some((e: { distanceM: number }) => Math.abs(e.distanceM - want) < Math.max(0.5, want * 0.01))).toBe(true);
    }
    const uploads = api.app.ctx.config.uploadDir;
    const stored = filesUnder(path.join(uploads, 'traces'));
    expect(stored.sort()).toEqual((await Trace.findAll({ attributes: ['rawPath'] })).map((t) => path.join(uploads, t.rawPath)).sort());
    expect(filesUnder(path.join(uploads, 'incoming'))).toEqual([]);
  });
});

describe('POST /api/tickets, 10 at once', () => {
  it('raises all ten tickets, one per finding', async () => {
    const findings: number[] = [];
    for (const id of uploadedIds.slice(0, 10)) {
      const res = await tech.post('/api/findings', { traceId: id, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' }).expect(201);
      findings.push(res.body.id);
    }
    const before = await Ticket.count();
    const responses = await Promise.all(findings.map((findingId) => sup.post('/api/tickets', { findingIds: [findingId], priority: 'normal' })));
    expect(responses.map((r) => r.status)).toEqual(findings.map(() => 201));
    expect(await Ticket.count()).toBe(before + 10);
    const links = await TicketFinding.findAll({ where: { findingId: findings } });
    expect(links.map((l) => l.findingId).sort((a, b) => a - b)).toEqual([...findings].sort((a, b) => a - b));
    expect(new Set(links.map((l) => l.ticketId)).size).toBe(10);
    expect(await Finding.count({ where: { id: findings } })).toBe(10);
  });
});

describe('POST /api/tickets/:id/comments, 30 at once', () => {
  it('records every comment exactly once', async () => {
    const ticket = await Ticket.findOne({ order: [['id', 'ASC']] });
    const words = Array.from({ length: 30 }, (_, i) => `Crew note ${i + 1}: cover lifted at the chamber`);
    const responses = await Promise.all(words.map((comment) => sup.post(`/api/tickets/${ticket!.id}/comments`, { comment })));
    expect(responses.map((r) => r.status)).toEqual(words.map(() => 200));
    const comments = await TicketEvent.findAll({ where: { ticketId: ticket!.id, kind: 'comment' } });
    expect(comments.map((c) => c.comment).sort()).toEqual([...words].sort());
  });
});
