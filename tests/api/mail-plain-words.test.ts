import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { OutboxMessageView } from '../../shared/schemas/outbox';
import { startApi, type Client, type TestApi } from './support/api';
import { eventually } from './mail.support';
import { confirmedFinding, supervisedRun } from './tickets.support';

let api: TestApi;
let sup: Client;
let fx: Awaited<ReturnType<typeof supervisedRun>>;

/** The message to `to` whose subject matches, as the capture SMTP server received it; its rows each on one line. */
async function delivered(to: string, subject: RegExp): Promise<OutboxMessageView & { oneLine: string }> {
  const admin = await api.as('admin');
  const m = await eventually(async () => {
    const res = await admin.get(`/api/outbox?to=${encodeURIComponent(to)}`).expect(200);
    return (res.body.items as OutboxMessageView[]).find((x) => subject.test(x.subject));
  }, `an e-mail to ${to} matching ${subject}`);
  // Plain-text rows wrap at 76 characters with the value column kept: a continuation joins its row again.
  return { ...m, oneLine: m.body.replace(/\n {2,}/g, ' ') };
}

beforeAll(async () => {
  api = await startApi();
  sup = await api.as('supervisor');
  fx = await supervisedRun(api, 'Plain words run');
});
afterAll(() => api?.close());

/** The caution the mails carry, point by point as the screens' SafetyCaution says it (common practice for work on de-energised cables). */
function expectSafetyLines(text: string) {
  expect(text).toContain('de-energise the cable, lock out and verify it is dead');
  expect(text).toContain('discharge its stored charge and keep it grounded');
  expect(text).toContain('high-voltage fault-location methods (surge, thumping, burn-down) are for qualified persons only');
  expect(text).toContain('locate other utilities before digging');
  expect(text).toContain('Follow local codes, your employer’s procedures and the permit for the work.');
}

describe('the e-mails say the verdict in the words the screens use', () => {
  let single: { id: number };

  it('tells the supervisor of a fault with one reading: its type, the best location, “one reading only”, and no figures said twice', async () => {
    single = await confirmedFinding(api, fx.run.id, 120);
    const m = await delivered('supervisor.test@example.com', /^Fault confirmed/);
    const text = m.oneLine.replace(/\s+/g, ' ');
    expect(m.body).toMatch(/^Fault: +Open conductor$/m);
    // 120 m of cable from A on the 200 m run passes the 2 m and 3 m coils: chainage 115 m, 35 m past MH-2 (hand-worked).
    expect(m.oneLine).toMatch(/^Best location: +120\.\d m of cable from end A \(Cabinet C-1\), ± \d\.\d\d m \(standard uncertainty\)$/m);
    expect(m.oneLine).toMatch(/^Where to dig: +35\.\d m past manhole MH-2 toward pedestal P-7/m);
    expect(m.oneLine).toMatch(/^Readings: +One reading only: nothing to compare it with\.$/m);
    // As the finding and ticket pages say it, instead of the same distance and window again under another name.
    expect(m.oneLine).toMatch(/^This TDR reading: +The best location above is this reading alone: the same distance, window and place to dig\.$/m);
    expect(m.body).not.toContain('Its own window');
    expect(text).not.toMatch(/χ²|σ/);
    expectSafetyLines(text);
    expect(m.html).toContain('<th align="left" valign="top" style="color:#3b4a57;width:30%">Fault</th><td>Open conductor</td>');
  });

  it('tells the technician assigned a repair whose readings agree that they agree, without the test’s figures', async () => {
    // The same fault read from end B (80 m of cable from B on the 200 m run) and by a Murray loop from A:
    // 0.3 of a loop of two equal 200 m conductors = 0.3 × 400 = 120 m (hand-worked), so the readings agree.
    const fromB = await confirmedFinding(api, fx.run.id, 80, 'B');
    await (await api.as('technician'))
      .post('/api/measurements', {
        findingId: single.id,
        kind: 'murray',
        instrument: 'Loop bridge, serial LB-17',
        readings: { fromEnd: 'A', ratio: 0.3, faulty: [{ lengthM: 200, material: 'copper', sizeMm2: 16 }], temperatureC: 11 },
      })
      .expect(201);
    const t = (await sup.post('/api/tickets', { findingIds: [single.id, fromB.id], assigneeId: api.users.technician.id }).expect(201)).body as { id: number };
    const m = await delivered('technician.test@example.com', new RegExp(`^Ticket ${t.id} assigned to you`));
    const text = m.oneLine.replace(/\s+/g, ' ');
    expect(m.body).toMatch(/^Fault: +Open conductor$/m);
    expect(m.oneLine).toMatch(/^Best location: +120\.\d m of cable from end A/m);
    expect(m.oneLine).toMatch(/^Readings: +The 2 readings agree\.$/m);
    // Several readings make the best location: this reading's own figures stay, named as its own.
    expect(m.oneLine).toMatch(/^This TDR reading: +120\.\d m along the cable from end A \(Cabinet C-1\), ± \d\.\d\d m \(95 %\)$/m);
    expect(text).not.toMatch(/χ²|σ|degrees? of freedom/);
    expectSafetyLines(text);
  });
});
