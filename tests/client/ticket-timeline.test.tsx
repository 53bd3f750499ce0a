import { render, screen } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import type { TicketEventView } from '../../shared/schemas/tickets';
import { TicketTimeline } from '../../src/features/tickets/components/ticket-timeline';

const event = (over: Partial<TicketEventView>): TicketEventView => ({
  id: 1,
  kind: 'updated',
  actor: { id: 2, name: 'Sam Supervisor' },
  at: '2026-12-02T13:09:00Z',
  fromStatus: null,
  toStatus: null,
  comment: null,
  changes: null,
  ...over,
});

describe('the ticket timeline', () => {
  it('writes a changed priority by its label and a changed due date as a date, as the rest of the ticket does', () => {
    render(
      <TicketTimeline
        events={[
          event({ id: 1, changes: { priority: ['high', 'urgent'], dueDate: ['2026-12-05', '2026-12-07'] } }),
          event({ id: 2, changes: { dueDate: [null, '2026-12-04'], title: ['Old', 'New'] } }),
        ]}
      />,
    );
    // The changes are the inner list's items (each event is an item of the outer list).
    const lines = screen
      .getAllByRole('listitem')
      .filter((li) => !li.querySelector('li'))
      .map((li) => li.textContent);
    expect(lines).toEqual([
      'Priority: High → Urgent',
      'Due date: 5 Dec 2026 → 7 Dec 2026',
      'Due date: none → 4 Dec 2026',
      'Title: Old → New',
    ]);
  });
});

describe('an assignment on the ticket timeline', () => {
  const headline = (events: TicketEventView[]) => {
    const { container } = render(<TicketTimeline events={events} />);
    // The event items are the outer list's own children; the first line of each is its headline.
    return Array.from(container.querySelectorAll('[data-testid="ticket-timeline"] > li')).map((li) => li.querySelector('p')?.textContent);
  };

  it('names the act, then the status step, so the step does not read as the assignee changing', () => {
    expect(
      headline([
        event({ id: 1, kind: 'assigned', fromStatus: 'raised', toStatus: 'assigned', changes: { assignee: [null, 'Tomas Ekwueme'] } }),
        event({ id: 2, kind: 'assigned', changes: { assignee: ['Tomas Ekwueme', 'Ines Ravelo'] } }),
        event({ id: 3, kind: 'assigned', fromStatus: 'assigned', toStatus: 'raised', changes: { assignee: ['Ines Ravelo', null] } }),
      ]),
    ).toEqual([
      'Sam Supervisor assigned the ticket: Raised → Assigned',
      'Sam Supervisor reassigned the ticket',
      'Sam Supervisor took the assignee off the ticket: Assigned → Raised',
    ]);
  });
});
