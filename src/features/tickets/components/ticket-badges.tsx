import type { TicketPriority, TicketStatus } from '../../../../shared/tickets/status';
import { StatusBadge } from '../../../components/ui/status-badge';

export function TicketStatusBadge({ status }: { status: TicketStatus }) {
  return <StatusBadge kind="ticket" status={status} />;
}

export function PriorityBadge({ priority }: { priority: TicketPriority }) {
  return <StatusBadge kind="priority" status={priority} />;
}
