import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { SiteRunFields } from '../../src/features/traces/components/site-run-fields';

afterEach(cleanup);

const sites = [
  { id: 1, name: 'Harbour Road depot' },
  { id: 2, name: 'Quarry Lane pumping station' },
];
const runs = [
  { id: 11, name: 'Feeder 3 to ring main unit' },
  { id: 12, name: 'Pilot pair 7' },
];

describe('the site and cable run choice shared by the upload and on-phone analysis forms', () => {
  it('keeps the run list shut until a site is chosen, and says why', () => {
    const onSite = vi.fn();
    render(<SiteRunFields sites={sites} runs={[]} siteId="" runId="" onSite={onSite} onRun={() => {}} />);
    const run = screen.getByLabelText(/Cable run/) as HTMLSelectElement;
    expect(run.disabled).toBe(true);
    expect(run.options[0].textContent).toBe('Choose the site first');
    fireEvent.change(screen.getByLabelText(/Site/), { target: { value: '2' } });
    expect(onSite).toHaveBeenCalledExactlyOnceWith('2');
  });

  it("lists the chosen site's runs, reports the one chosen and shows the run's error", () => {
    const onRun = vi.fn();
    render(<SiteRunFields sites={sites} runs={runs} siteId="1" runId="" onSite={() => {}} onRun={onRun} runError="Choose the cable run the trace was taken on" />);
    const run = screen.getByLabelText(/Cable run/) as HTMLSelectElement;
    expect(run.disabled).toBe(false);
    expect([...run.options].map((o) => o.textContent)).toEqual(['Choose a cable run…', 'Feeder 3 to ring main unit', 'Pilot pair 7']);
    fireEvent.change(run, { target: { value: '12' } });
    expect(onRun).toHaveBeenCalledExactlyOnceWith('12');
    expect(screen.getByText('Choose the cable run the trace was taken on')).toBeTruthy();
  });
});
