import { describe, expect, it } from 'vitest';
import { csvTrouble, unclosedQuoteLine } from '../../../shared/trace/csv-trouble';
import { parseTraceCsv } from '../../../shared/trace';
import { traceInputError } from '../../support/trace-input-error';

describe('where a quote that is never closed was opened', () => {
  it('names the line of the last quote still open, counting from the text’s first line', () => {
    expect(unclosedQuoteLine('a,b\n1,2\n"3,4\n5,6\n', 1)).toBe(3);
    expect(unclosedQuoteLine('1,2\n"3,4\n5,6\n', 10)).toBe(11);
    // A quoted cell that closes, then one that does not.
    expect(unclosedQuoteLine('"x",1\n"y,2\n', 1)).toBe(2);
    // A doubled quote inside quotes is a quote mark, not the cell's end.
    expect(unclosedQuoteLine('"say ""hi""",1\n2,3\n', 1)).toBeNull();
    expect(unclosedQuoteLine('"say ""hi"",1\n2,3\n', 1)).toBe(1);
    expect(unclosedQuoteLine('1,2\n3,4\n', 1)).toBeNull();
  });

  it('gives plain words for the reader’s codes, and a layout hint for any other', () => {
    expect(csvTrouble('CSV_QUOTE_NOT_CLOSED')).toContain('opens a cell and is never closed');
    expect(csvTrouble('CSV_INVALID_CLOSING_QUOTE')).toContain('write a quote mark twice');
    expect(csvTrouble('SOMETHING_ELSE')).toContain('not laid out as CSV');
    expect(csvTrouble(undefined)).toContain('not laid out as CSV');
  });

  it('a trace whose stray quote is on line 4 of 6 is refused at line 4, not at the file’s end or a line of the reader’s own count', () => {
    const text = 'time_ns,v\n0,0.1\n1,0.2\n2,"0.3\n3,0.4\n4,0.5\n';
    for (const reader of ['auto', 'csv-parse'] as const) {
      const err = traceInputError(() => parseTraceCsv(text, { reader }));
      expect(err.code).toBe('CSV_SYNTAX');
      expect(err.line).toBe(4);
      expect(err.message).toBe(
        'line 4: the CSV could not be read: a double quote (") opens a cell and is never closed; look for a stray quote on this line',
      );
    }
  });
});
