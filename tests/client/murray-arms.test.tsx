import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { murrayLoop, murrayRatioFromArms } from '../../shared/locate/bridge';
import type { MeasurementView } from '../../shared/schemas/measurements';
import {
  emptyMeasurementForm,
  formToReadings,
  MeasurementForm,
  measurementToForm,
  type MeasurementFormState,
} from '../../src/features/locate/components/measurement-form';

afterEach(cleanup);

describe('a Murray loop entered by its ratio arms', () => {
  it('gives Q/(P+Q) from the arms (hand-worked)', () => {
    // Arms at balance P = 3 Ω (sound side), Q = 1 Ω (faulty side): Q/(P+Q) = 1/4 (Murray balance P/Q = R/X).
    expect(murrayRatioFromArms(3, 1)).toBe(0.25);
    // P = 659 Ω, Q = 341 Ω: 341/1000 = 0.341.
    expect(murrayRatioFromArms(659, 341)).toBeCloseTo(0.341, 12);
    // The loop method reads the arms through the same formula: 1/4 of a loop of two equal 1000 m cores is 500 m of it, 500 m from A.
    const byArms = murrayLoop('m', { installedLengthM: 1000 }, { fromEnd: 'A', soundSideArmOhm: 3, faultySideArmOhm: 1, faulty: [{ lengthM: 1000, material: 'copper', sizeMm2: 16 }] });
    const byRatio = murrayLoop('m', { installedLengthM: 1000 }, { fromEnd: 'A', ratio: 0.25, faulty: [{ lengthM: 1000, material: 'copper', sizeMm2: 16 }] });
    expect(byArms.distanceFromEndM).toBeCloseTo(500, 9);
    expect(byArms.distanceFromEndM).toBe(byRatio.distanceFromEndM);
  });

  it('lets the technician switch the form to the arms, shows the ratio with the formula’s source, and sends the arms', () => {
    const onSubmit = vi.fn<(f: MeasurementFormState, reason: string) => void>();
    render(<MeasurementForm initial={emptyMeasurementForm(900, 'm')} unit="m" correcting={false} pending={false} error={null} onSubmit={onSubmit} />);
    expect(screen.getByLabelText('Ratio at balance, Q/(P+Q)')).toBeTruthy();
    fireEvent.change(screen.getByLabelText('Balance entered as'), { target: { value: 'arms' } });
    expect(screen.queryByLabelText('Ratio at balance, Q/(P+Q)')).toBeNull();
    fireEvent.change(screen.getByLabelText('Ratio arm P, sound side (Ω)'), { target: { value: '659' } });
    fireEvent.change(screen.getByLabelText('Ratio arm Q, faulty side (Ω)'), { target: { value: '341' } });
    expect(screen.getByTestId('murray-arms-ratio').textContent).toBe('Ratio Q/(P+Q) = 0.3410: the share of the loop between the test end and the fault.');
    expect(screen.getByText(/Principles of Power System/).textContent).toContain('X = Q/(P+Q) of the loop');
    fireEvent.click(screen.getByRole('button', { name: 'Record the reading' }));
    const sent = formToReadings(onSubmit.mock.calls[0][0], 'm');
    expect(sent.kind).toBe('murray');
    expect(sent.readings).toMatchObject({ soundSideArmOhm: 659, faultySideArmOhm: 341 });
    expect('ratio' in sent.readings).toBe(false);
  });

  it('opens a reading recorded by its arms for correction with the arms, and one by its ratio with the ratio', () => {
    const base = { id: 1, kind: 'murray', instrument: 'Loop bridge LB-3', measuredAt: '2026-11-30T09:00:00.000Z', note: null } as unknown as MeasurementView;
    const arms = measurementToForm({ ...base, readings: { fromEnd: 'A', soundSideArmOhm: 3, faultySideArmOhm: 1, faulty: [{ lengthM: 900, material: 'copper', sizeMm2: 16 }] } } as MeasurementView, 900, 'm');
    expect([arms.murrayEntry, arms.armP, arms.armQ, arms.ratio]).toEqual(['arms', '3', '1', '']);
    const ratio = measurementToForm({ ...base, readings: { fromEnd: 'A', ratio: 0.341, faulty: [{ lengthM: 900, material: 'copper', sizeMm2: 16 }] } } as MeasurementView, 900, 'm');
    expect([ratio.murrayEntry, ratio.ratio]).toEqual(['ratio', '0.341']);
    expect(formToReadings(ratio, 'm').readings).toMatchObject({ ratio: 0.341 });
  });
});
