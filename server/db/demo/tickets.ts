import { addDays, format } from 'date-fns';
import type { SessionUser } from '../../auth/guards';
import type { AppContext } from '../../context';
import { closeOutTicket, createTicket, moveTicket, unticketedFindings } from '../../tickets/tickets.service';
import type { User } from '../models';

const asSession = (u: User): SessionUser => ({ id: u.id, email: u.email, name: u.name, role: u.role });

/**
 * Two repair tickets from the demo findings, so the loop is visible on first
 * start: one under way with the first technician, one closed out by the
 * second (its found position waits in the planners' calibration queue).
 * Any other findings stay without a ticket for the dashboard.
 */
export async function seedTickets(ctx: AppContext, users: Map<string, User>) {
  const supervisor = users.get('supervisor@example.com');
  const tech = users.get('tech@example.com');
  const tech2 = users.get('tech2@example.com');
  if (!supervisor || !tech || !tech2) return { tickets: 0 };
  const findings = (await unticketedFindings(50)).sort((a, b) => a.id - b.id);
  const sup = asSession(supervisor);
  let tickets = 0;

  const first = findings[0];
  if (first) {
    const t = await createTicket(ctx, sup, {
      findingIds: [first.id],
      title: null,
      assigneeId: tech.id,
      priority: 'high',
      dueDate: format(addDays(new Date(), 3), 'yyyy-MM-dd'),
      notes: 'Traffic management booked for the morning. Call the depot before opening the pit.',
    });
    await moveTicket(ctx, asSession(tech), t.id, { to: 'under-way', comment: 'Crew on site, marking out the dig window.' });
    tickets++;
  }

  const second = findings[1];
  if (second) {
    const t = await createTicket(ctx, sup, {
      findingIds: [second.id],
      title: null,
      assigneeId: tech2.id,
      priority: 'normal',
      dueDate: format(addDays(new Date(), 7), 'yyyy-MM-dd'),
      notes: null,
    });
    const crew = asSession(tech2);
    await moveTicket(ctx, crew, t.id, { to: 'under-way', comment: null });
    // The crew found it a little further out than the reading said, as digs often do.
    const foundM = Math.min(second.distanceM + 1.8, t.cableRun.installedLengthM);
    await closeOutTicket(ctx, crew, t.id, {
      found: { method: 'distance', fromEnd: second.measuredFrom, distanceM: Math.round(foundM * 10) / 10 },
      cause: 'water-ingress',
      workDone: 'Cut out the wet length and fitted a new straight joint; insulation tested before backfill.',
      fileCalibration: true,
      comment: 'Joint pit left coned off for the reinstatement crew.',
    });
    tickets++;
  }
  return { tickets };
}
