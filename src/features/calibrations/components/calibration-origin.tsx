import { Fragment } from 'react';
import { Link } from 'react-router-dom';
import type { CalibrationView } from '../../../../shared/schemas/cables';
import { paths } from '../../../app/paths';

/**
 * Where a calibration's numbers came from, as links to open: the repair ticket whose close-out filed it and the
 * trace its round trip was read off. Nothing for one typed in by hand with neither.
 */
export function CalibrationOrigin({
  c,
  separator = ' · ',
}: {
  c: Pick<CalibrationView, 'id' | 'ticketId' | 'traceId'>;
  separator?: string;
}) {
  const links = [
    c.ticketId !== null && (
      <Link
        key="ticket"
        to={paths.ticket.to(c.ticketId)}
        className="text-teal underline"
        data-testid={`calibration-${c.id}-ticket`}
      >
        ticket {c.ticketId}
      </Link>
    ),
    c.traceId !== null && (
      <Link key="trace" to={paths.trace.to(c.traceId)} className="text-teal underline" data-testid={`calibration-${c.id}-trace`}>
        trace {c.traceId}
      </Link>
    ),
  ].filter(Boolean);
  return (
    <>
      {links.map((l, i) => (
        <Fragment key={i}>
          {separator}
          {l}
        </Fragment>
      ))}
    </>
  );
}
