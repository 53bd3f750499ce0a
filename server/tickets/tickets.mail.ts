import type { Transaction } from 'sequelize';
import { describeRoute, type RoutePosition } from '../../shared/field/route-position';
import { FINDING_KIND_LABELS } from '../../shared/schemas/findings';
import { TICKET_PRIORITY_LABELS, TICKET_STATUS_LABELS, type TicketStatus } from '../../shared/tickets/status';
import type { AppContext } from '../context';
import { CableRun, Finding, Site, Ticket, Trace, User } from '../db/models';
import { appLink } from '../mail';
import { composeMail, SAFETY_LINE } from '../mail/compose';
import { bestLocationFor } from '../findings/best-location';
import { bestLocationRows, ONLY_READING_SENTENCE, onlyReadingFromBText, onlyReadingOf } from '../../shared/locate/words';
import type { BestLocationView } from '../../shared/schemas/measurements';
import { formatDate } from '../../shared/units/format-date';
import { formatLength, formatLengthRange, formatSignedLength, lengthsInText, type LengthUnit } from '../../shared/units/format-length';

const kindLabel = (k: string) => FINDING_KIND_LABELS[k as keyof typeof FINDING_KIND_LABELS] ?? k;

/** The route sentence in the reader's unit, with any marker the dig window crosses (the stored text is in metres). */
function whereText(f: Finding, unit: LengthUnit): string {
  const pos = f.routePosition as RoutePosition | null;
  return pos ? describeRoute(pos, unit) : lengthsInText(f.routePositionText, unit);
}

/** The distance a subject line leads with: the best location from end A, else the reading from its own end. */
function headlineDistance(f: Finding & { trace?: Trace }, best: BestLocationView | null, unit: LengthUnit): string {
  if (best?.distanceFromAM != null) return `${formatLength(best.distanceFromAM, unit)} from end A`;
  return `${formatLength(f.distanceM, unit)} from end ${f.trace?.end ?? 'A'}`;
}

function findingRows(f: Finding, trace: Trace | null, run: CableRun, unit: LengthUnit, best: BestLocationView | null = null): Array<[string, string]> {
  const end = trace?.end ?? 'A';
  const endLabel = end === 'A' ? run.endALabel : run.endBLabel;
  const underBest = best !== null;
  // The best location is this reading and no other: as on the finding and ticket pages, say so rather than repeat its figures.
  if (onlyReadingOf(best, f.id)) {
    const fromB = end === 'B' ? ` ${onlyReadingFromBText({ distanceM: f.distanceM, uncertaintyM: f.uncertaintyM, endLabel }, unit)}.` : '';
    return [['This TDR reading', `${ONLY_READING_SENTENCE}${fromB}`]];
  }
  return [
    // Under a best location these rows are the one TDR reading this finding was made from.
    [underBest ? 'This TDR reading' : 'Distance', `${formatLength(f.distanceM, unit)} along the cable from end ${end} (${endLabel}), ± ${formatLength(f.uncertaintyM, unit)} (95 %)`],
    // Where the best location is placed on the route ("Where to dig"), the place is said once, there: this reading's own
    // sentence would name the same spot again from another marker (a reading from B counts from the B side).
    ...(best?.routePosition ? [] : ([['Route position', whereText(f, unit)]] as Array<[string, string]>)),
    // Beside the best location's dig window, this one is said to be the one reading's own (under "This TDR reading").
    [underBest ? 'Its own window' : 'Cable-length window', `${formatLengthRange(f.windowStartM, f.windowEndM, unit)} along the cable from end ${end}, slack included`],
  ];
}

/**
 * The site's supervisors get one e-mail each (in their own unit) when a
 * finding is confirmed, queued in the transaction that confirms it (a first
 * decision or a reversal), so a confirmed fault is never left untold. A site with no supervisor named falls back to every
 * active supervisor, so the news is never dropped.
 */
export async function mailFindingConfirmed(ctx: AppContext, findingId: number, transaction: Transaction) {
  const finding = await Finding.findByPk(findingId, {
    include: [
      { association: 'site', include: [{ association: 'supervisors', where: { active: true, role: ['supervisor', 'admin'] }, required: false }] },
      { association: 'cableRun' },
      { association: 'trace' },
      { association: 'confirmedBy' },
    ],
    transaction,
  });
  if (!finding || finding.status !== 'confirmed') return;
  const site = finding.site as Site;
  const run = finding.cableRun as CableRun;
  let recipients = site.supervisors ?? [];
  const fallback = recipients.length === 0;
  if (fallback) recipients = await User.findAll({ where: { role: 'supervisor', active: true }, transaction });
  const link = appLink(ctx.config, `/findings/${finding.id}`);
  const best = await bestLocationFor(finding.id, transaction);
  for (const r of recipients) {
    const mail = composeMail({
      subject: `Fault confirmed at ${site.name}: ${run.name}, ${headlineDistance(finding, best, r.unitPreference)}`,
      // Who else got it is said with who sent it, apart from the technician's note, which may end without a full stop.
      intro: `${finding.confirmedBy?.name ?? 'A technician'} confirmed a fault (${kindLabel(finding.kind)}) at ${site.name}.${fallback ? ' No supervisor is named for this site, so every supervisor gets this message.' : ''}`,
      rows: [
        ['Site', site.name],
        ['Cable run', `${run.name} (${run.endALabel} → ${run.endBLabel})`],
        ['Fault', kindLabel(finding.kind)],
        ...(best ? bestLocationRows(best, run, r.unitPreference) : []),
        ...findingRows(finding, finding.trace ?? null, run, r.unitPreference, best),
      ],
      paragraph: finding.note ? `Note: ${finding.note}` : null,
      link: { label: 'Open the finding', url: link },
      footer: SAFETY_LINE,
    });
    await ctx.mail.queue.enqueue({ kind: 'finding-confirmed', to: [r.email], ...mail, findingId: finding.id }, transaction);
  }
}

export type TicketMailReason =
  | { kind: 'assigned' }
  | { kind: 'unassigned'; to: User }
  | { kind: 'status'; from: TicketStatus; to: TicketStatus; comment: string | null }
  | { kind: 'updated'; changes: string[]; comment: string | null }
  | { kind: 'comment'; comment: string }
  | { kind: 'fixed'; to: User; found: { measuredFrom: 'A' | 'B'; foundDistanceM: number; locatedDistanceM: number; errorM: number } };

/** Tell the right person about a change to a ticket, inside the change's transaction. */
export async function mailTicket(ctx: AppContext, ticketId: number, actor: { id: number; name: string }, reason: TicketMailReason, transaction: Transaction) {
  const ticket = await Ticket.findByPk(ticketId, {
    include: [{ association: 'site' }, { association: 'cableRun' }, { association: 'assignee' }, { association: 'findings', include: [{ association: 'trace' }] }],
    transaction,
  });
  if (!ticket) return;
  const recipient = reason.kind === 'unassigned' || reason.kind === 'fixed' ? reason.to : ticket.assignee;
  // Nobody is e-mailed about their own action.
  if (!recipient || !recipient.active || recipient.id === actor.id) return;
  const unit = recipient.unitPreference;
  const site = ticket.site as Site;
  const run = ticket.cableRun as CableRun;
  const first = [...(ticket.findings ?? [])].sort((a, b) => a.id - b.id)[0];
  const ref = `Ticket ${ticket.id}`;
  // The same best location the ticket page and the crew sheet show.
  const best = first ? await bestLocationFor(first.id, transaction) : null;
  const rows: Array<[string, string]> = [
    ['Ticket', `${ref}: ${ticket.title}`],
    ['Status', TICKET_STATUS_LABELS[ticket.status]],
    ['Priority', TICKET_PRIORITY_LABELS[ticket.priority]],
    ['Due', ticket.dueDate ? formatDate(ticket.dueDate) : 'no date set'],
    ['Site', site.name],
    ['Cable run', `${run.name} (${run.endALabel} → ${run.endBLabel})`],
    ...(first ? ([['Fault', [...new Set(ticket.findings!.map((f) => kindLabel(f.kind)))].join(', ')]] as Array<[string, string]>) : []),
    ...(best ? bestLocationRows(best, run, unit) : []),
    ...(first ? findingRows(first, first.trace ?? null, run, unit, best) : []),
  ];
  let subject: string;
  let intro: string;
  let paragraph: string | null = null;
  switch (reason.kind) {
    case 'assigned':
      subject = `${ref} assigned to you: ${ticket.title}`;
      intro = `${actor.name} assigned you a repair at ${site.name}.`;
      paragraph = ticket.notes ? `Notes: ${ticket.notes}` : null;
      break;
    case 'unassigned':
      subject = `${ref} is no longer yours: ${ticket.title}`;
      intro = `${actor.name} took you off this repair${ticket.assignee ? ` and gave it to ${ticket.assignee.name}` : ''}.`;
      break;
    case 'status':
      subject = `${ref} is now ${TICKET_STATUS_LABELS[reason.to].toLowerCase()}: ${ticket.title}`;
      intro = `${actor.name} moved your ticket from ${TICKET_STATUS_LABELS[reason.from].toLowerCase()} to ${TICKET_STATUS_LABELS[reason.to].toLowerCase()}.`;
      paragraph = reason.comment ? `Comment: ${reason.comment}` : null;
      break;
    case 'updated':
      subject = `${ref} changed: ${ticket.title}`;
      intro = `${actor.name} changed your ticket: ${reason.changes.join('; ')}.`;
      paragraph = reason.comment ? `Comment: ${reason.comment}` : null;
      break;
    case 'comment':
      subject = `${ref}: a comment from ${actor.name}`;
      intro = `${actor.name} commented on your ticket.`;
      paragraph = reason.comment;
      break;
    case 'fixed': {
      const f = reason.found;
      subject = `${ref} fixed, waiting for your sign-off: ${ticket.title}`;
      intro = `${actor.name} recorded the repair.`;
      // What the dig found, ahead of the rest, in the reader's unit.
      rows.unshift(
        ['Found', `${formatLength(f.foundDistanceM, unit)} along the cable from end ${f.measuredFrom}`],
        ['Located', `${formatLength(f.locatedDistanceM, unit)} (located − found ${formatSignedLength(f.errorM, unit)})`],
      );
      break;
    }
  }
  const mail = composeMail({
    subject,
    intro,
    rows,
    paragraph,
    link: { label: 'Open the ticket', url: appLink(ctx.config, `/tickets/${ticket.id}`) },
    footer: SAFETY_LINE,
  });
  await ctx.mail.queue.enqueue({ kind: `ticket-${reason.kind}`, to: [recipient.email], ...mail, ticketId: ticket.id }, transaction);
}
