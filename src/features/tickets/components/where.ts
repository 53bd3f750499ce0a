import { describeRoutePosition } from '../../../../shared/field/route-position';
import type { TicketFindingView } from '../../../../shared/schemas/tickets';
import { formatLength, type LengthUnit } from '../../../lib/format';

/** The route sentence in the reader's unit (the stored text is in metres). */
export function findingWhere(f: TicketFindingView, unit: LengthUnit) {
  return f.routePosition ? describeRoutePosition(f.routePosition, (m) => formatLength(m, unit, 1)) : f.routePositionText;
}
