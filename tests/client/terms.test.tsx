import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import { DistanceBlock } from '../../src/features/findings/components/where-to-dig';
import { Term } from '../../src/components/ui/term';

afterEach(cleanup);

describe('a trade term with its meaning a tap away', () => {
  it('keeps the window line word for word, and opens and closes the plain-language meaning of "Cable-length window"', () => {
    render(
      <DistanceBlock
        distanceM={44.4}
        windowStartM={43.4}
        windowEndM={45.5}
        end="B"
        endLabel="Telemetry radio mast"
        unit="m"
        pos={null}
      />,
    );
    const line = screen.getByTestId('cable-window');
    expect(line.textContent).toBe('Cable-length window: 43.4–45.5 m along the cable from end B, slack included');
    const term = screen.getByRole('button', { name: 'Cable-length window' });
    expect(term.getAttribute('aria-expanded')).toBe('false');
    expect(screen.queryByRole('note')).toBeNull();

    fireEvent.click(term);
    expect(term.getAttribute('aria-expanded')).toBe('true');
    const note = screen.getByRole('note', { name: 'Cable-length window' });
    expect(note.textContent).toContain('slack coiled at markers included');
    expect(term.getAttribute('aria-controls')).toBe(note.id);

    // Escape closes it and leaves the focus on the term.
    fireEvent.keyDown(document, { key: 'Escape' });
    expect(screen.queryByRole('note')).toBeNull();
    expect(document.activeElement).toBe(term);
    expect(line.textContent).toBe('Cable-length window: 43.4–45.5 m along the cable from end B, slack included');
  });

  it('closes when the reader taps anywhere else, the explanation itself included, and a tap on the term toggles it', () => {
    render(
      <p>
        <Term k="rho">ρ</Term> = +0.922 · <Term k="blindZone" />
        <span data-testid="elsewhere">elsewhere</span>
      </p>,
    );
    fireEvent.click(screen.getByRole('button', { name: 'ρ' }));
    expect(screen.getByRole('note', { name: 'ρ, the reflection coefficient' }).textContent).toMatch(
      /from −1 to \+1\. Near \+1 is an open .* near −1 is a short/,
    );
    fireEvent.pointerDown(screen.getByTestId('elsewhere'));
    expect(screen.queryByRole('note')).toBeNull();
    // Open again: a tap on the explanation closes it, so it never stands over what lies under it.
    fireEvent.click(screen.getByRole('button', { name: 'ρ' }));
    fireEvent.pointerDown(screen.getByRole('note'));
    expect(screen.queryByRole('note')).toBeNull();

    // A term without its own words is shown by its name.
    const blind = screen.getByRole('button', { name: 'Blind zone' });
    fireEvent.click(blind);
    expect(screen.getByRole('note', { name: 'Blind zone' }).textContent).toContain('cannot be seen from this end');
    fireEvent.click(blind);
    expect(screen.queryByRole('note')).toBeNull();
  });
});
