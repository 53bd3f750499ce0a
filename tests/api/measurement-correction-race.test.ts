import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Measurement } from '../../server/db/models';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type TestApi } from './support/api';

// A bridge reading corrected by two people at the same moment, or corrected while it is withdrawn: a reading's
// versions are one chain, each superseded by at most one, and a withdrawn reading is superseded by none.
// PostgreSQL runs the transactions side by side.

let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

/** Both conductors of the 200 m run: 16 mm² copper (IEC 60228 class 2, 1.15 Ω/km). */
const conductor = [{ lengthM: 200, material: 'copper', sizeMm2: 16 }];
const murray = (ratio: number) => ({
  kind: 'murray',
  instrument: 'Loop bridge, serial HV-0042',
  measuredAt: '2026-03-02T10:15:00Z',
  readings: { fromEnd: 'A', ratio, faulty: conductor, temperatureC: 11 },
});

describe('a reading changed twice at once', () => {
  it('keeps one chain: one change goes through and the others are refused with 409', async () => {
    const { run } = await makeRun('Correction race run');
    const tech = await api.as('technician');
    const reviewers = [];
    for (let i = 0; i < 3; i++) reviewers.push(await api.as('supervisor'));
    const up = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(run.id))
      .field('end', 'A')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 120, vf: 0.66 })), 'A-120.csv')
      .expect(201);
    const { body: finding } = await tech
      .post('/api/findings', { traceId: up.body.traces[0].id, eventIndex: 0, status: 'confirmed', kind: 'high-resistance' })
      .expect(201);
    for (let round = 0; round < 4; round++) {
      const { body: m } = await tech.post('/api/measurements', { ...murray(0.3), findingId: finding.id }).expect(201);
      const withdraw = round % 2 === 1;
      const results = await Promise.all([
        ...reviewers.map((r, i) =>
          r.post(`/api/measurements/${m.id}/corrections`, { ...murray(0.2 + 0.01 * i), reason: `second look ${i}` }),
        ),
        ...(withdraw ? [tech.post(`/api/measurements/${m.id}/withdraw`, { reason: 'bridge lead on the wrong core' })] : []),
      ]);
      const ok = results.filter((r) => r.status === 200 || r.status === 201);
      expect(ok).toHaveLength(1);
      for (const r of results.filter((x) => !ok.includes(x))) {
        expect(r.status).toBe(409);
        expect(r.body.error.code).toBe('not_active');
      }
      const successors = await Measurement.count({ where: { supersedesId: m.id } });
      const status = (await Measurement.findByPk(m.id))!.status;
      if (status === 'withdrawn') expect(successors).toBe(0);
      else expect([status, successors]).toEqual(['corrected', 1]);
    }
  });
});
