/**
 * Spreadsheet formula injection, after the OWASP "CSV Injection" guidance:
 * spreadsheet programs read a cell that begins with =, +, -, @, a tab or a
 * carriage return as a formula (=HYPERLINK(...) and worse). Text cells that
 * begin so are written with a leading single quote, which spreadsheets show
 * as plain text; the importer takes it off again. A text cell that already
 * begins with quotes before such a character gets one more, so every value
 * survives export and import unchanged. Number cells are never touched
 * (-0.5 stays a number).
 */
const FORMULA_START = /^'*[=+\-@\t\r]/;
const PROTECTED = /^'+[=+\-@\t\r]/;

/** The text as written to an exported CSV cell. */
export function protectCell(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

/** The text as it was before protectCell, from a cell read back by the importer. */
export function unprotectCell(text: string): string {
  return PROTECTED.test(text) ? text.slice(1) : text;
}
