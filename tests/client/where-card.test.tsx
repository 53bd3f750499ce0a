import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { WhereCard } from '../../src/features/traces/components/where-card';

afterEach(cleanup);

const sites = [{ id: 1, name: 'Harbour Road depot' }];
const runs = [{ id: 11, name: 'Feeder 3 to ring main unit' }];
// 250 m of run with two markers on it: 820.2 ft (250 / 0.3048).
const run = { installedLengthM: 250, endALabel: 'Substation bay 2', endBLabel: 'Ring main unit 4', markers: [{}, {}] };
const cable = { name: 'XLPE MV 3-core 95 mm²', vf: 0.56, vfTolerance: 0.03 };

function show(over: Partial<Parameters<typeof WhereCard>[0]> = {}) {
  const onEnd = vi.fn();
  render(
    <WhereCard sites={sites} runs={runs} siteId="1" runId="11" onSite={() => {}} onRun={() => {}} run={run} cable={cable} unit="m" end="" onEnd={onEnd} {...over} />,
  );
  return onEnd;
}

describe('"1. Where", one card for the upload and the phone’s own analysis', () => {
  it('says the chosen run in one line, with its cable’s velocity factor, and names the ends by their labels', () => {
    const onEnd = show();
    expect(screen.getByRole('heading', { name: '1. Where' })).toBeTruthy();
    expect(screen.getByTestId('where-run-summary').textContent).toBe('XLPE MV 3-core 95 mm² · VF 0.560 ± 3.0 % · installed 250.0 m · 2 route markers');
    fireEvent.click(screen.getByRole('button', { name: /End B/ }));
    expect(onEnd).toHaveBeenCalledExactlyOnceWith('B');
    expect(screen.getByRole('button', { name: /End B/ }).textContent).toContain('Ring main unit 4');
  });

  it('says so when the phone keeps no cable type for the run, in the reader’s unit', () => {
    show({ cable: undefined, unit: 'ft' });
    expect(screen.getByTestId('where-run-summary').textContent).toBe('Its cable type is not in the library kept on this phone · installed 820.2 ft · 2 route markers');
  });

  it('shows no run line, and no chosen run, until a run is chosen, and the end’s error when there is one', () => {
    show({ run: undefined, endError: 'Choose the end the instrument was connected at' });
    expect(screen.queryByTestId('where-run-summary')).toBeNull();
    expect((screen.getByLabelText(/Cable run/) as HTMLSelectElement).value).toBe('');
    expect(screen.getByText('Choose the end the instrument was connected at')).toBeTruthy();
  });
});
