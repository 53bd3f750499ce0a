import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { issueWords } from '../../../shared/schemas/issue-words';

const words = (schema: z.ZodType, value: unknown) => {
  const r = schema.safeParse(value);
  if (r.success) throw new Error('expected a refusal');
  return r.error.issues.map(issueWords);
};

describe("zod's stock English in the product's words", () => {
  it('says a text limit in characters, and an empty text as such', () => {
    expect(words(z.string().max(100), 'x'.repeat(101))).toEqual(['must be at most 100 characters']);
    expect(words(z.string().min(1), '')).toEqual(['must not be empty']);
    expect(words(z.string().min(3), 'ab')).toEqual(['must be at least 3 characters']);
  });

  it('says a number limit, inclusive or not, and a list limit in items', () => {
    expect(words(z.number().max(5), 6)).toEqual(['must be at most 5']);
    expect(words(z.number().positive(), 0)).toEqual(['must be more than 0']);
    expect(words(z.number().lt(1), 1)).toEqual(['must be less than 1']);
    expect(words(z.array(z.number()).max(2), [1, 2, 3])).toEqual(['must have at most 2 items']);
  });

  it('names the choices, the type wanted, and a missing value', () => {
    expect(words(z.enum(['ok', 'failed', 'pending']), 'bogus')).toEqual(['must be one of: ok, failed, pending']);
    expect(words(z.number(), 'seven')).toEqual(['must be a number']);
    expect(words(z.number().int(), 1.5)).toEqual(['must be a whole number']);
    expect(words(z.object({ a: z.string() }), {})).toEqual(['is required']);
    expect(words(z.strictObject({}), { b: 1 })).toEqual(['is not expected here']);
  });

  it('keeps a message set on the schema', () => {
    expect(words(z.string().max(3, 'must be at most 3 letters'), 'abcd')).toEqual(['must be at most 3 letters']);
  });
});
