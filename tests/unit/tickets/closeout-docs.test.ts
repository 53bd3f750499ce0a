import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { CloseoutSchema } from '../../../shared/schemas/tickets';

const doc = readFileSync(join(__dirname, '../../../docs/tickets-api.md'), 'utf8');

describe('the close-out reference', () => {
  it('states the default of fileCalibration that the request schema applies', () => {
    const parsed = CloseoutSchema.parse({
      found: { method: 'distance', fromEnd: 'A', distanceM: 100 },
      cause: 'splice-fault',
      workDone: 'spliced again',
    });
    expect(parsed.fileCalibration).toBe(true);
    const row = doc.split('\n').find((l) => l.startsWith('| `POST /api/tickets/:id/closeout`'));
    expect(row).toContain('`fileCalibration` defaults to `true`');
  });
});
