/**
 * What a CSV reader's error means, in words a person fixing the file can act on, and where a quote
 * that is never closed was opened (the reader only notices at the end of the file). Used by the trace
 * reader and the cable library's import.
 */
const CSV_TROUBLE: Record<string, string> = {
  CSV_QUOTE_NOT_CLOSED: 'a double quote (") opens a cell and is never closed; look for a stray quote on this line',
  CSV_INVALID_CLOSING_QUOTE: 'a quoted cell goes on after its closing quote; inside quotes, write a quote mark twice ("")',
  CSV_NON_TRIMABLE_CHAR_AFTER_CLOSING_QUOTE:
    'a quoted cell goes on after its closing quote; inside quotes, write a quote mark twice ("")',
  INVALID_OPENING_QUOTE:
    'a quote mark appears inside a cell that does not start with one; put the whole cell in quotes and write the quote mark twice ("")',
};

const LAYOUT = 'its cells are not laid out as CSV (one row per line, cells separated by commas, semicolons or tabs)';

/** The plain-words reason for a reader error code (csv-parse's `code`). */
export function csvTrouble(code: string | undefined): string {
  return (code !== undefined && CSV_TROUBLE[code]) || LAYOUT;
}

/**
 * The line (counted from `firstLine`, the line `text` starts on) where the last quote still open at the
 * end of `text` was opened; null when every quote is closed. A doubled quote inside quotes is a quote mark.
 */
export function unclosedQuoteLine(text: string, firstLine: number, quote = '"'): number | null {
  let line = firstLine;
  let open: number | null = null;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (ch === '\n') line++;
    else if (ch === quote) {
      if (open === null) open = line;
      else if (text[i + 1] === quote) i++;
      else open = null;
    }
  }
  return open;
}
