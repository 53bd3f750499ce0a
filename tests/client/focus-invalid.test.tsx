import { cleanup, fireEvent, render, screen, waitFor } from '@testing-library/react';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { CableForm } from '../../src/features/cables/components/cable-form';
import { installFocusFirstInvalid } from '../../src/lib/focus-invalid';

let uninstall: () => void;
beforeAll(() => {
  uninstall = installFocusFirstInvalid(document);
});
afterAll(() => uninstall());
afterEach(cleanup);

describe('a form sent with fields it cannot take', () => {
  it('puts the focus on the first field to fix, then on the next one once that is fixed', async () => {
    const sent: unknown[] = [];
    render(<CableForm unit="m" pending={false} error={null} submitLabel="Add to the library" onSubmit={(v) => sent.push(v)} />);
    const vf = screen.getByLabelText('Velocity factor');
    fireEvent.change(vf, { target: { value: '1.4' } });
    const send = screen.getByRole('button', { name: 'Add to the library' });
    send.focus();
    fireEvent.click(send);
    const name = screen.getByLabelText('Name');
    await waitFor(() => expect(document.activeElement).toBe(name));
    expect(name.getAttribute('aria-invalid')).toBe('true');
    expect(sent).toEqual([]);

    fireEvent.change(name, { target: { value: 'Direct-buried feeder' } });
    fireEvent.change(screen.getByLabelText('Dielectric'), { target: { value: 'XLPE' } });
    fireEvent.change(screen.getByLabelText('Impedance Z0 (Ω)'), { target: { value: '30' } });
    send.focus();
    fireEvent.click(send);
    // The name is taken now: the velocity factor, faster than light, is the first to fix.
    await waitFor(() => expect(document.activeElement).toBe(vf));
    expect(screen.getByText('must be at most 1 (nothing is faster than light)')).toBeTruthy();
  });
});
