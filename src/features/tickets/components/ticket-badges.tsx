import { TICKET_PRIORITY_LABELS, TICKET_STATUS_LABELS, type TicketPriority, type TicketStatus } from '../../../../shared/tickets/status';
import { Badge } from '../../../components/ui/notice';

const STATUS_TONE: Record<TicketStatus, 'info' | 'ok' | 'warn' | 'danger' | 'plain'> = {
  raised: 'warn',
  assigned: 'info',
  'under-way': 'info',
  fixed: 'ok',
  'signed-off': 'plain',
  withdrawn: 'plain',
};

export function TicketStatusBadge({ status }: { status: TicketStatus }) {
  return <Badge tone={STATUS_TONE[status]}>{TICKET_STATUS_LABELS[status]}</Badge>;
}

const PRIORITY_TONE: Record<TicketPriority, 'danger' | 'warn' | 'plain'> = { urgent: 'danger', high: 'warn', normal: 'plain', low: 'plain' };

export function PriorityBadge({ priority }: { priority: TicketPriority }) {
  return <Badge tone={PRIORITY_TONE[priority]}>{TICKET_PRIORITY_LABELS[priority]} priority</Badge>;
}
