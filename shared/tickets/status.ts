/**
 * A repair ticket's life and who may move it. The server enforces these
 * rules; the client reads them only to offer the right buttons.
 *
 *   raised ──assign──▶ assigned ──start──▶ under-way ──close-out──▶ fixed ──sign off──▶ signed-off
 *      │                  │  ▲                 │                      │
 *      │                  │  └──── pause ──────┘                      └── reopen ──▶ under-way
 *      └──────────────────┴──── withdraw (supervisor) ──▶ withdrawn
 *
 * "fixed" is reached only through a close-out (where the fault was found,
 * what it was, what was done), and "signed-off" only from "fixed", so a
 * ticket can never be closed without a close-out.
 */
export const TICKET_STATUSES = ['raised', 'assigned', 'under-way', 'fixed', 'signed-off', 'withdrawn'] as const;
export type TicketStatus = (typeof TICKET_STATUSES)[number];

export const TICKET_STATUS_LABELS: Record<TicketStatus, string> = {
  raised: 'Raised',
  assigned: 'Assigned',
  'under-way': 'Under way',
  fixed: 'Fixed, awaiting sign-off',
  'signed-off': 'Signed off',
  withdrawn: 'Withdrawn',
};

/** Still needing someone's attention. */
export const OPEN_STATUSES: readonly TicketStatus[] = ['raised', 'assigned', 'under-way', 'fixed'];
export const isOpen = (s: TicketStatus) => OPEN_STATUSES.includes(s);

export const TICKET_PRIORITIES = ['urgent', 'high', 'normal', 'low'] as const;
export type TicketPriority = (typeof TICKET_PRIORITIES)[number];
export const TICKET_PRIORITY_LABELS: Record<TicketPriority, string> = { urgent: 'Urgent', high: 'High', normal: 'Normal', low: 'Low' };

export type Mover = 'assignee' | 'supervisor';

export interface Move {
  from: TicketStatus;
  to: TicketStatus;
  /**
   * Who may make it: the assignee, a supervisor (tickets:manage), or both. Starting and pausing the work are the
   * crew's own steps: a supervisor who wants other hands on it assigns the ticket to someone else.
   */
  by: readonly Mover[];
  /** The button's words. */
  label: string;
}

/**
 * Moves made with POST /status. Assigning (raised → assigned) happens by
 * setting an assignee, and fixing (→ fixed) by recording a close-out, so
 * neither is listed here.
 */
export const MOVES: readonly Move[] = [
  { from: 'assigned', to: 'under-way', by: ['assignee'], label: 'Start work' },
  { from: 'under-way', to: 'assigned', by: ['assignee'], label: 'Pause work' },
  { from: 'fixed', to: 'signed-off', by: ['supervisor'], label: 'Sign off' },
  { from: 'fixed', to: 'under-way', by: ['supervisor'], label: 'Reopen: not fixed' },
  { from: 'raised', to: 'withdrawn', by: ['supervisor'], label: 'Withdraw' },
  { from: 'assigned', to: 'withdrawn', by: ['supervisor'], label: 'Withdraw' },
  { from: 'under-way', to: 'withdrawn', by: ['supervisor'], label: 'Withdraw' },
];

/** Statuses from which the crew may record a close-out. */
export const CLOSEOUT_FROM: readonly TicketStatus[] = ['assigned', 'under-way'];

export function findMove(from: TicketStatus, to: TicketStatus): Move | undefined {
  return MOVES.find((m) => m.from === from && m.to === to);
}

/** What this person may do to the ticket now. */
export function allowedMoves(status: TicketStatus, who: { isAssignee: boolean; isSupervisor: boolean }): Move[] {
  return MOVES.filter((m) => m.from === status && ((who.isAssignee && m.by.includes('assignee')) || (who.isSupervisor && m.by.includes('supervisor'))));
}

/** The close-out says where the crew found the fault and what they did: it is the assignee's to record. */
export function mayCloseOut(status: TicketStatus, who: { isAssignee: boolean; isSupervisor: boolean }): boolean {
  return CLOSEOUT_FROM.includes(status) && who.isAssignee;
}
