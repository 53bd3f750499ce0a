import { describe, expect, it } from 'vitest';
import { formNumber, repeatedFields, textId, textInt, textNumber } from '../../../shared/schemas/input';

/** A query or form field given twice arrives as a list; the strict number readers say so rather than "not in digits". */
const message = (r: { success: boolean; error?: { issues: Array<{ message: string }> } }) => r.error?.issues.map((i) => i.message);

describe('number readers given a field twice', () => {
  it.each([
    ['textInt', textInt({ what: 'a page number' })],
    ['textId', textId()],
    ['textNumber', textNumber({ what: 'a time in ns' })],
    ['formNumber', formNumber({ what: 'velocity factor as a number' })],
  ])('%s says the field was given more than once', (_name, schema) => {
    expect(message(schema.safeParse(['1', '2']))).toEqual(['was given more than once; give it once']);
  });

  it('tells a single bracketed value from a repeat, and still reads one value and refuses bad digits', () => {
    expect(message(textInt().safeParse(['1']))).toEqual(['must be given once, as plain text (not as a list such as field[])']);
    expect(message(formNumber().safeParse({ x: '1' }))).toEqual(['must be given once, as plain text (not with a bracketed part such as field[x])']);
    expect(textInt().parse('7')).toBe(7);
    expect(formNumber().parse('0.66')).toBe(0.66);
    expect(message(textInt({ what: 'a page number' }).safeParse('0x10'))).toEqual(['must be a page number, written in digits']);
  });
});

describe('repeatedFields', () => {
  it('names each field that is not one plain value, in order', () => {
    expect(repeatedFields({ page: ['1', '2'], q: 'pump', end: ['A'], vf: { a: '1' } })).toEqual([
      { field: 'page', message: 'was given more than once; give it once' },
      { field: 'end', message: 'must be given once, as plain text (not as a list such as field[])' },
      { field: 'vf', message: 'must be given once, as plain text (not with a bracketed part such as field[x])' },
    ]);
    expect(repeatedFields({ page: '1' })).toEqual([]);
    expect(repeatedFields(undefined)).toEqual([]);
  });
});
