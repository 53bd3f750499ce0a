import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MailJob, MethodScore, User } from '../../server/db/models';
import type { BestLocationView } from '../../shared/schemas/measurements';
import type { DashboardView, TicketDetail } from '../../shared/schemas/tickets';
import { formatLength, formatLengthRange } from '../../shared/units/format-length';
import { startApi, type Client, type TestApi } from './support/api';
import { confirmedFinding, supervisedRun } from './tickets.support';

/**
 * The run: 200 m of solid-PE coax (VF 0.66 ± 2 %), MH-1 at chainage 40 m with 2 m coiled, MH-2 at 80 m with
 * 3 m, P-7 at 120 m. One open 120 m of cable from end A: the trace from A sees it at 120 m, the one from B at 80 m.
 */
let api: TestApi;
let fx: Awaited<ReturnType<typeof supervisedRun>>;
let sup: Client;
let tech: Client;
let fa: { id: number; distanceM: number };
let fb: { id: number; distanceM: number };
let best: BestLocationView;
let ticket: TicketDetail;

/** Both conductors: 16 mm² copper, IEC 60228 class 2 (1.15 Ω/km). */
const conductor = [{ lengthM: 200, material: 'copper', sizeMm2: 16 }];

beforeAll(async () => {
  api = await startApi();
  fx = await supervisedRun(api, 'Fused ticket run');
  sup = await api.as('supervisor');
  tech = await api.as('technician');
  fa = await confirmedFinding(api, fx.run.id, 120, 'A');
  // The site's supervisor reads in feet from here on: the second finding's e-mail is in feet.
  await User.update({ unitPreference: 'ft' }, { where: { id: api.users.supervisor.id } });
  fb = await confirmedFinding(api, fx.run.id, 80, 'B');
  // Murray loop from A: 0.3 of a loop of two equal 200 m conductors = 0.3 × 400 = 120 m (hand-worked).
  await tech
    .post('/api/measurements', {
      findingId: fa.id,
      kind: 'murray',
      instrument: 'Loop bridge, serial LB-17',
      readings: { fromEnd: 'A', ratio: 0.3, faulty: conductor, temperatureC: 11 },
    })
    .expect(201);
});
afterAll(() => api?.close());

describe('one best location on the finding, the ticket, the crew sheet and the e-mail', () => {
  it('fuses the two traces and the bridge reading into the finding’s best location', async () => {
    best = (await sup.get(`/api/findings/${fa.id}`).expect(200)).body.bestLocation;
    expect(best.consistent).toBe(true);
    const used = best.methods.filter((m) => m.used).map((m) => m.method).sort();
    expect(used).toEqual(['murray-loop', 'tdr-two-ended']);
    // Two-ended 120 m ± 1.2 m (1 % of 200 m × t_A/(t_A + t_B) = 0.6) and Murray 120 m ± 1.2055 m share the installed
    // length's error, so the best location is 120 m with u just over 1.2 m (hand-worked in tests/api/measurements.test.ts).
    expect(best.distanceFromAM!).toBeCloseTo(120, 0);
    expect(best.standardUncertaintyM!).toBeGreaterThan(1.19);
    expect(best.standardUncertaintyM!).toBeLessThan(1.21);
    expect(best.windowStartM!).toBeCloseTo(best.distanceFromAM! - 2 * best.standardUncertaintyM!, 9);
    // 120 m of cable passes MH-1 (2 m coiled) and MH-2 (3 m): chainage 115 m, 35 m past MH-2 (hand-worked).
    expect(best.routePosition!.from.label).toBe('MH-2');
    expect(best.routePosition!.offsetM).toBeCloseTo(35, 0);
    // No marker has coordinates: no position on the map, and the finding says why.
    expect(best.ground).toBeNull();
    expect(best.groundNote).toMatch(/No route marker of this run has coordinates/);
  });

  it('carries the same numbers on the ticket (and so the crew sheet) and in the queued assignment e-mail', async () => {
    const res = await sup.post('/api/tickets', { findingIds: [fa.id], assigneeId: api.users.technician.id, priority: 'high' }).expect(201);
    ticket = res.body;
    // The crew sheet is drawn from this same ticket view.
    const onTicket = ticket.findings[0].bestLocation!;
    expect(onTicket.distanceFromAM).toBe(best.distanceFromAM);
    expect(onTicket.standardUncertaintyM).toBe(best.standardUncertaintyM);
    expect([onTicket.windowStartM, onTicket.windowEndM]).toEqual([best.windowStartM, best.windowEndM]);
    expect(onTicket.routePositionText).toBe(best.routePositionText);
    const again = (await tech.get(`/api/tickets/${ticket.id}`).expect(200)).body as TicketDetail;
    expect(again.findings[0].bestLocation!.distanceFromAM).toBe(best.distanceFromAM);

    const job = await MailJob.findOne({ where: { ticketId: ticket.id, kind: 'ticket-assigned' } });
    expect(job).not.toBeNull();
    // Plain-text rows wrap at 76 characters with the value column kept: read each row as one line.
    const text = job!.text.replace(/\n {2,}/g, ' ');
    // The technician reads metres: the same numbers through the one length formatter.
    const d = formatLength(best.distanceFromAM, 'm');
    const u = formatLength(best.standardUncertaintyM, 'm');
    const w = formatLengthRange(best.windowStartM!, best.windowEndM!, 'm');
    expect(d).toBe('120.0 m');
    expect(text).toMatch(new RegExp(`Best location: +${d} of cable from end A \\(Cabinet C-1\\), ± ${u} \\(standard uncertainty\\)`));
    expect(text).toMatch(new RegExp(`Dig window \\(95 %\\): +${w} of cable from end A`));
    expect(text).toMatch(/Where to dig: +35\.\d m past manhole MH-2 toward pedestal P-7; dig on the ground/);
    expect(text).toMatch(/Based on: +TDR from both ends \(findings \d+ and \d+\), \d+ %; Murray loop from end A \(reading \d+\), \d+ %/);
    // The single reading the finding was made from stays below, named as such.
    expect(text).toMatch(/This TDR reading: +120\.\d+ m along the cable from end A/);
    expect(text.indexOf('Best location:')).toBeLessThan(text.indexOf('This TDR reading:'));
  });

  it('leads the supervisor’s finding e-mail with the best location in the supervisor’s own unit', async () => {
    const job = await MailJob.findOne({ where: { findingId: fb.id, kind: 'finding-confirmed' } });
    // When the finding from B was confirmed there were two traces and no bridge reading: the two-ended 120 m,
    // 120 / 0.3048 = 393.7 ft from end A (international foot, exact).
    expect(job!.subject).toMatch(/Fused ticket run, 393\.\d ft from end A$/);
    expect(job!.text).toMatch(/Best location: +393\.\d ft of cable from end A \(Cabinet C-1\)/);
    expect(job!.text).toMatch(/Based on: +TDR from both ends \(findings \d+ and \d+\), 100 %/);
    expect(job!.text).not.toMatch(/\d m\b/);
  });

  it('says where to dig once in the finding e-mail of the reading from end B: from the best location, not again from the B side', async () => {
    const job = await MailJob.findOne({ where: { findingId: fb.id, kind: 'finding-confirmed' } });
    const text = job!.text.replace(/\n {2,}/g, ' ');
    // 120 m of cable from A is chainage 115 m, 35 m past MH-2 (hand-worked above): 35 / 0.3048 = 114.8 ft.
    expect(text).toMatch(/Where to dig: +114\.8 ft past manhole MH-2 toward pedestal P-7; dig on the ground/);
    // The reading from B alone (80 m of cable from B) would place the same spot from P-7 toward MH-2: not said a second time.
    expect(text).not.toContain('Route position:');
    expect(text.match(/ toward /g)).toHaveLength(1);
    // The reading's own distance and window stay, named as this reading's.
    expect(text).toMatch(/This TDR reading: +262\.\d ft along the cable from end B/);
    expect(text).toMatch(/Its own window: +[\d.]+–[\d.]+ ft along the cable from end B, slack included/);
  });

  it('scores every method against the found position at close-out, and the dashboard shows it per method and cable type', async () => {
    await tech.post(`/api/tickets/${ticket.id}/status`, { to: 'under-way' }).expect(200);
    // Found 121 m of cable from A.
    const closed = await tech
      .post(`/api/tickets/${ticket.id}/closeout`, {
        found: { method: 'distance', fromEnd: 'A', distanceM: 121 },
        cause: 'open-conductor',
        workDone: 'Cut out and jointed.',
        fileCalibration: false,
      })
      .expect(200);
    const scores = (closed.body as TicketDetail).closeouts[0].methodScores!;
    const by = (method: string) => scores.filter((s) => s.method === method);
    expect(scores[0].method).toBe('best-location');
    // Murray: 120 − 121 = −1 m, inside its window 120 ± 2 × 1.2055 m (hand-worked).
    expect(by('murray-loop')[0].errorM).toBeCloseTo(-1, 6);
    expect(by('murray-loop')[0].withinWindow).toBe(true);
    expect(by('best-location')[0].errorM).toBeCloseTo(best.distanceFromAM! - 121, 9);
    expect(by('best-location')[0].withinWindow).toBe(true);
    // The trace from B is scored from B: found 200 − 121 = 79 m from B; it read about 80 m.
    const fromB = by('tdr-single-ended').find((s) => s.fromEnd === 'B')!;
    expect(fromB.foundFromEndM).toBeCloseTo(79, 9);
    expect(fromB.errorM).toBeCloseTo(fb.distanceM - 79, 9);
    expect(fromB.used).toBe(false);
    expect(await MethodScore.count({ where: { ticketId: ticket.id } })).toBe(5);

    const dash = (await sup.get('/api/dashboard').expect(200)).body as DashboardView;
    const murray = dash.methodAccuracy.filter((r) => r.method === 'murray-loop');
    expect(murray.map((r) => r.cableType?.name ?? 'all')).toEqual(['all', 'Test solid PE coax']);
    expect(murray[0]).toMatchObject({ count: 1, withinWindow: 1 });
    expect(murray[0].meanErrorM).toBeCloseTo(-1, 6);
    expect(murray[0].meanAbsErrorM).toBeCloseTo(1, 6);
    expect(dash.methodAccuracy[0].method).toBe('best-location');
  });
});
