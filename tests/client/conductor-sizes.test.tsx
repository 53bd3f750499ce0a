import { cleanup, render, screen, within } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import { emptyMeasurementForm, MeasurementForm } from '../../src/features/locate/components/measurement-form';

afterEach(cleanup);

describe('the conductor size list of a bridge reading', () => {
  it('runs from the smallest size to the largest', () => {
    render(<MeasurementForm initial={emptyMeasurementForm(900, 'm')} unit="m" correcting={false} pending={false} error={null} onSubmit={() => {}} />);
    const sizes = within(screen.getByLabelText('Size (mm²)'))
      .getAllByRole('option')
      .map((o) => o.textContent)
      .filter((t) => t !== 'Choose');
    // IEC 60228's copper sizes, 1.5 mm² to 630 mm²: 1.5 and 2.5 had come after 630.
    expect(sizes.slice(0, 4)).toEqual(['1.5', '2.5', '4', '6']);
    expect(sizes.at(-1)).toBe('630');
    expect(sizes.map(Number)).toEqual([...sizes.map(Number)].sort((a, b) => a - b));
  });
});
