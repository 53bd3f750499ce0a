import { describe, expect, it } from 'vitest';
import { ApiError, describeError, fieldLabel, plainMessage } from '../../../src/lib/api-client';

// The server's error body for invalid input, as errors.ts writes it: the message lists "field: message".
const invalid = (fields: Array<{ field: string; message: string; line?: number }>) =>
  new ApiError(400, 'invalid_input', `The input is not valid: ${fields.map((f) => `${f.field}: ${f.message}`).join('; ')}`, { fields });

describe('error words without internal field names', () => {
  it('names a field by the form’s own label', () => {
    const e = invalid([{ field: 'pulseWidthNs', message: 'must be a number of nanoseconds' }]);
    expect(describeError(e, { pulseWidthNs: 'Pulse width' })).toBe('Please check: Pulse width must be a number of nanoseconds.');
    expect(describeError(e)).not.toContain('pulseWidthNs');
  });

  it('spells out a field no form named, and numbers list items from one', () => {
    expect(fieldLabel('pulseWidthNs')).toBe('Pulse width');
    expect(fieldLabel('markers.2.chainageM')).toBe('Marker 3, chainage');
    expect(fieldLabel('found.offsetM')).toBe('Distance past the marker');
    expect(fieldLabel('cableRunId')).toBe('Cable run');
  });

  it('turns zod’s stock English into ours', () => {
    expect(plainMessage('Invalid input: expected number, received NaN')).toBe('must be a number');
    expect(plainMessage('Invalid input: expected string, received undefined')).toBe('is required');
    expect(plainMessage('Too small: expected number to be >=0')).toBe('must be at least 0');
    expect(plainMessage('Invalid option: expected one of "A"|"B"')).toBe('is not one of the choices');
    expect(plainMessage('must be a positive id')).toBe('must be a positive id');
    const e = invalid([{ field: 'id', message: 'Invalid input: expected number, received NaN' }]);
    expect(describeError(e)).toBe('Please check: The address of this page must be a number.');
  });

  it('keeps a message that names no field, and gives a line when the server gave one', () => {
    expect(describeError(new ApiError(409, 'already_decided', 'Event 2 was decided a moment ago.'))).toBe('Event 2 was decided a moment ago.');
    const e = new ApiError(422, 'found_position_off_cable', 'found.offsetM: must be 0 or more', { fields: [{ field: 'found.offsetM', message: 'must be 0 or more' }] });
    expect(describeError(e)).toBe('Distance past the marker must be 0 or more.');
    const csv = invalid([{ field: 'vf', message: 'must be at most 1', line: 4 }]);
    expect(describeError(csv)).toBe('Please check: Line 4: Velocity factor must be at most 1.');
  });
});
