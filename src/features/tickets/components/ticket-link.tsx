import { Link } from 'react-router-dom';
import { TICKET_STATUS_LABELS, type TicketStatus } from '../../../../shared/tickets/status';
import { paths } from '../../../app/paths';

const LOOKS = {
  /** Underlined text, for a row of a list. */
  inline: 'inline-flex min-h-11 items-center text-sm font-semibold text-teal underline',
  /** An outlined button, beside a page's title. */
  button: 'inline-flex min-h-11 items-center rounded-md border border-teal px-4 text-sm font-semibold text-teal hover:bg-teal/10',
};

/** A link to a repair ticket acting on a finding, naming the ticket and its status. */
export function TicketLink({ ticket, look, testId }: { ticket: { id: number; status: TicketStatus }; look: keyof typeof LOOKS; testId: string }) {
  return (
    <Link to={paths.ticket.to(ticket.id)} className={LOOKS[look]} data-testid={testId}>
      On repair ticket {ticket.id} ({TICKET_STATUS_LABELS[ticket.status].toLowerCase()})
    </Link>
  );
}
