import { fireEvent, render, screen } from '@testing-library/react';
import { describe, expect, it, vi } from 'vitest';
import { Pager } from '../../src/components/ui/pager';

describe('the page buttons under a list', () => {
  it('are not shown when everything fits on one page, and the count still is', () => {
    render(<Pager page={1} pageSize={25} total={7} onPage={() => {}} />);
    expect(screen.getByText('1–7 of 7')).toBeTruthy();
    expect(screen.queryByRole('button', { name: 'Previous' })).toBeNull();
    expect(screen.queryByRole('button', { name: 'Next' })).toBeNull();
  });

  it('says so when there is nothing, with no buttons', () => {
    render(<Pager page={1} pageSize={25} total={0} onPage={() => {}} />);
    expect(screen.getByText('Nothing to show')).toBeTruthy();
    expect(screen.queryByRole('button')).toBeNull();
  });

  it('move between pages where there are more, the first page unable to go back', () => {
    const onPage = vi.fn();
    render(<Pager page={1} pageSize={25} total={60} onPage={onPage} />);
    expect(screen.getByText('1–25 of 60')).toBeTruthy();
    expect((screen.getByRole('button', { name: 'Previous' }) as HTMLButtonElement).disabled).toBe(true);
    fireEvent.click(screen.getByRole('button', { name: 'Next' }));
    expect(onPage).toHaveBeenCalledWith(2);
  });
});
