import { describe, expect, it } from 'vitest';
import { uploadKey } from '../../src/features/traces/api/upload-traces';
import { IDEMPOTENCY_KEY } from '../../shared/schemas/traces';

const csv = (name: string) => new File(['time_ns,voltage_V\n0,0.5\n'], name, { type: 'text/csv' });

describe('the Idempotency-Key of an upload', () => {
  it('is the same for a retry of the same files and form, in a form the server accepts', () => {
    const a = csv('pole-14.csv');
    const b = csv('pole-15.csv');
    const fields = { cableRunId: '3', end: 'A', pulseWidthNs: '' };
    const first = uploadKey([a, b], fields);
    expect(first).toMatch(IDEMPOTENCY_KEY);
    expect(uploadKey([a, b], { end: 'A', cableRunId: '3' })).toBe(first);
  });

  it('is new for other files, a file chosen again, or the same files sent with a changed form', () => {
    const a = csv('pole-14.csv');
    const fields = { cableRunId: '3', end: 'A' };
    const first = uploadKey([a], fields);
    expect(uploadKey([csv('pole-14.csv')], fields)).not.toBe(first);
    expect(uploadKey([a], { cableRunId: '4', end: 'A' })).not.toBe(first);
    expect(uploadKey([a], { cableRunId: '3', end: 'B' })).not.toBe(first);
    expect(uploadKey([a], { ...fields, vfOverride: '0.62' })).not.toBe(first);
    expect(uploadKey([a], fields)).toBe(first);
  });
});
