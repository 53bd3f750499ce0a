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
