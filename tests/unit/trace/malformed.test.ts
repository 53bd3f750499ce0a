import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { MAX_MESSAGE_CHARS, parseTraceCsv, type TraceInputError, type ParseOptions } from '../../../shared/trace';
import { traceInputError } from '../../support/trace-input-error';

// Each file in the corpus was written by hand to break one rule; expected.json
// names the error code, the line and words the message must contain.
const dir = join(__dirname, '../../fixtures/traces/malformed');
const expected = JSON.parse(readFileSync(join(dir, 'expected.json'), 'utf8')) as Record<
  string,
  { code: string; line?: number; message?: string; options?: ParseOptions }
>;

function failure(text: string | Uint8Array, options: ParseOptions): TraceInputError {
  return traceInputError(() => parseTraceCsv(text, options));
}

describe('malformed trace corpus', () => {
  it('has at least 30 files, each with an expectation', () => {
    const files = readdirSync(dir).filter((f) => f.endsWith('.csv'));
    expect(files.length).toBeGreaterThanOrEqual(30);
    expect(files.sort()).toEqual(Object.keys(expected).sort());
  });

  for (const [file, exp] of Object.entries(expected)) {
    it(`rejects ${file} with ${exp.code}`, () => {
      const text = readFileSync(join(dir, file), 'utf8');
      for (const reader of ['auto', 'csv-parse'] as const) {
        const err = failure(text, { ...exp.options, reader });
        expect(err.code).toBe(exp.code);
        if (exp.line !== undefined) {
          expect(err.line).toBe(exp.line);
          expect(err.message).toMatch(new RegExp(`^line ${exp.line}: `));
        }
        if (exp.message) expect(err.message).toContain(exp.message);
        // Messages are stored and listed as they are, so none may grow with the file.
        expect(err.message.length).toBeLessThanOrEqual(MAX_MESSAGE_CHARS);
      }
      // The same file given as bytes fails the same way.
      const fromBytes = failure(readFileSync(join(dir, file)), exp.options ?? {});
      expect(fromBytes.code).toBe(exp.code);
      expect(fromBytes.message).toBe(failure(text, exp.options ?? {}).message);
    });
  }
});
