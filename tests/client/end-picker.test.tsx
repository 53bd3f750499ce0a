import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { EndPicker } from '../../src/features/traces/components/end-picker';

afterEach(cleanup);

describe('the end picker shared by the upload and on-phone analysis forms', () => {
  it("shows each end's own label, marks the chosen end pressed and reports a tap on the other", () => {
    const onChange = vi.fn();
    render(<EndPicker end="A" onChange={onChange} labels={{ A: 'Substation North', B: 'Pole 14' }} />);
    const a = screen.getByRole('button', { name: /End A/ });
    const b = screen.getByRole('button', { name: /End B/ });
    expect(a.textContent).toContain('Substation North');
    expect(b.textContent).toContain('Pole 14');
    expect(a.getAttribute('aria-pressed')).toBe('true');
    expect(b.getAttribute('aria-pressed')).toBe('false');
    fireEvent.click(b);
    expect(onChange).toHaveBeenCalledExactlyOnceWith('B');
  });

  it('shows a dash for both ends before a run is chosen, and the error when there is one', () => {
    render(<EndPicker end="" onChange={() => {}} labels={null} error="Say which end the instrument is on" />);
    expect(screen.getByRole('button', { name: /End A/ }).textContent).toContain('—');
    expect(screen.getByRole('button', { name: /End B/ }).getAttribute('aria-pressed')).toBe('false');
    expect(screen.getByText('Say which end the instrument is on')).toBeTruthy();
  });
});
