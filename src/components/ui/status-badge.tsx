import { TICKET_PRIORITY_LABELS, TICKET_STATUS_LABELS } from '../../../shared/tickets/status';
import { Badge } from './notice';

type Tone = 'info' | 'ok' | 'warn' | 'danger' | 'plain';

/**
 * Every status Rholog shows as a badge, each with one colour and one
 * capitalised label wherever it appears. The colours mean the same thing
 * everywhere: danger needs someone now (a fault, a failure), warn is waiting
 * on someone, info is in hand, ok is done or good, plain is closed or inactive.
 */
export const STATUS_BADGES = {
  ticket: {
    raised: ['warn', TICKET_STATUS_LABELS.raised],
    assigned: ['info', TICKET_STATUS_LABELS.assigned],
    'under-way': ['info', TICKET_STATUS_LABELS['under-way']],
    fixed: ['ok', TICKET_STATUS_LABELS.fixed],
    'signed-off': ['plain', TICKET_STATUS_LABELS['signed-off']],
    withdrawn: ['plain', TICKET_STATUS_LABELS.withdrawn],
  },
  priority: {
    urgent: ['danger', `${TICKET_PRIORITY_LABELS.urgent} priority`],
    high: ['warn', `${TICKET_PRIORITY_LABELS.high} priority`],
    normal: ['plain', `${TICKET_PRIORITY_LABELS.normal} priority`],
    low: ['plain', `${TICKET_PRIORITY_LABELS.low} priority`],
  },
  finding: {
    confirmed: ['danger', 'Confirmed fault'],
    dismissed: ['plain', 'Dismissed'],
  },
  calibration: {
    pending: ['warn', 'Waiting for review'],
    accepted: ['ok', 'Accepted'],
    rejected: ['plain', 'Rejected'],
  },
  trace: {
    failed: ['danger', 'Could not be read'],
    pending: ['info', 'Analysing…'],
    reference: ['info', 'Reference'],
  },
  person: {
    active: ['ok', 'Active'],
    deactivated: ['plain', 'Deactivated'],
  },
  mail: {
    queued: ['warn', 'Waiting to send'],
    sending: ['info', 'Sending'],
    retrying: ['warn', 'Retrying'],
    sent: ['ok', 'Sent'],
    failed: ['danger', 'Not delivered'],
  },
  ticketFlag: {
    mine: ['info', 'Yours'],
    overdue: ['danger', 'Overdue'],
    mailTrouble: ['danger', 'E-mail not delivered'],
  },
  vfSource: {
    'field-calibrated': ['ok', null],
    datasheet: ['info', null],
  },
} as const satisfies Record<string, Record<string, readonly [Tone, string | null]>>;

export type BadgeKind = keyof typeof STATUS_BADGES;

/**
 * The badge for a status. `label` replaces the standard words only where the
 * words come from elsewhere (a cable's VF source); the colour never changes.
 */
export function StatusBadge<K extends BadgeKind>({ kind, status, label }: { kind: K; status: string; label?: string }) {
  const entry = (STATUS_BADGES[kind] as Record<string, readonly [Tone, string | null]>)[status];
  const tone: Tone = entry?.[0] ?? 'plain';
  const words = label ?? entry?.[1] ?? status.charAt(0).toUpperCase() + status.slice(1).replace(/-/g, ' ');
  return <Badge tone={tone}>{words}</Badge>;
}
