import type { SessionUser } from '../../auth/guards';
import type { AppContext } from '../../context';
import { recordMeasurement } from '../../measurements/measurements.service';
import { createTicket } from '../../tickets/tickets.service';
import { CableRun, Finding, Trace, type User } from '../models';

const asSession = (u: User): SessionUser => ({ id: u.id, email: u.email, name: u.name, role: u.role });

/**
 * One fault located three ways, so the demo shows the window narrowing: the
 * insulation fault on Feeder HN-3, 612 m from the substation, is seen by a TDR
 * trace from end A, one from end B (the two together give a location free of
 * the velocity factor, which the library knows only to ±15 % for MV cable), and
 * a Murray loop reading. A repair ticket for it waits for the second crew.
 */
export async function seedFaultLocatedThreeWays(ctx: AppContext, users: Map<string, User>) {
  const tech = users.get('tech@example.com');
  const tech2 = users.get('tech2@example.com');
  const supervisor = users.get('supervisor@example.com');
  const run = await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } });
  if (!tech || !tech2 || !supervisor || !run) return { measurements: 0, tickets: 0 };
  const findings = await Finding.findAll({ where: { cableRunId: run.id, status: 'confirmed' }, order: [['id', 'ASC']] });
  const traces = await Trace.findAll({ where: { id: findings.map((f) => f.traceId) } });
  const fromA = findings.find((f) => traces.find((t) => t.id === f.traceId)?.end === 'A');
  const fromB = findings.find((f) => traces.find((t) => t.id === f.traceId)?.end === 'B');
  if (!fromA || !fromB) return { measurements: 0, tickets: 0 };

  // Murray loop from the substation, the faulty core strapped at the ring main unit to a sound core of the same
  // cable (185 mm² aluminium, IEC 60228 class 2): balance at 0.340 of the loop, 0.340 × 2 × 900 m = 612 m.
  await recordMeasurement(
    ctx,
    {
      findingId: fromA.id,
      kind: 'murray',
      instrument: 'Loop bridge LB-3, serial 0117',
      note: 'Demo: core L2 to screen, strapped to L1 at the ring main unit. Insulation test first: L2 8 kΩ to screen.',
      readings: {
        fromEnd: 'A',
        ratio: 0.34,
        ratioStep: 0.001,
        faulty: [{ lengthM: 900, material: 'aluminium', sizeMm2: 185 }],
        sound: 'same',
        temperatureC: 9,
      },
    },
    asSession(tech),
  );
  await createTicket(ctx, asSession(supervisor), {
    findingIds: [fromA.id, fromB.id],
    title: null,
    assigneeId: tech2.id,
    priority: 'urgent',
    dueDate: null,
    notes: 'Located from both ends and with the bridge: dig at the best location, not at either TDR reading alone.',
  });
  return { measurements: 1, tickets: 1 };
}
