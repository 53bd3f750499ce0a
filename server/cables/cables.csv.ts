import { CsvError, Parser } from 'csv-parse';
import { stringify } from 'csv-stringify/sync';
import type { Transaction } from 'sequelize';
import { CableTypeInputSchema, parseAttenuationList, parsePulseVfList, type CableTypeInput } from '../../shared/schemas/cables';
import { CableType, CableTypeChange } from '../db/models';
import type { FieldChange } from '../db/models/cable-type-change';
import { AppError, type FieldIssue } from '../errors';
import { protectCell, unprotectCell } from './csv-cells';
import { CABLE_FIELDS, cableNameKey, diffCable, historyValue, LIST_FIELDS, planUpdate, type CableField } from './cables.service';
import { findBidiControl } from '../http/strict-input';
import { csvTrouble, unclosedQuoteLine } from '../../shared/trace/csv-trouble';
import { issueWords } from '../../shared/schemas/issue-words';

/**
 * The library as CSV: one row per cable type, SI units named in the header.
 * The same columns are written by the export and read by the import.
 */
export const CSV_COLUMNS: Record<CableField, string> = {
  name: 'name',
  construction: 'construction',
  dielectric: 'dielectric',
  z0Ohm: 'z0_ohm',
  vf: 'vf',
  vfTolerance: 'vf_tolerance',
  attenuationDbPer100m: 'attenuation_db_per_100m',
  attenuationFreqMhz: 'attenuation_freq_mhz',
  vfSource: 'vf_source',
  vfReference: 'vf_reference',
  notes: 'notes',
  attenuation: 'attenuation_points',
  lossSource: 'loss_source',
  rDcOhmPerM: 'r_dc_ohm_per_m',
  skinOhmPerMRootHz: 'skin_ohm_per_m_root_hz',
  lHPerM: 'l_h_per_m',
  cFPerM: 'c_f_per_m',
  gSPerM: 'g_s_per_m',
  lossTangent: 'loss_tangent',
  pulseVfs: 'pulse_vfs',
};
const REQUIRED_COLUMNS: CableField[] = ['name', 'construction', 'dielectric', 'z0Ohm', 'vf', 'vfTolerance', 'vfSource', 'vfReference'];
const LINE_CONSTANTS: CableField[] = ['rDcOhmPerM', 'skinOhmPerMRootHz', 'lHPerM', 'cFPerM', 'gSPerM', 'lossTangent'];
const NUMERIC: CableField[] = ['z0Ohm', 'vf', 'vfTolerance', 'attenuationDbPer100m', 'attenuationFreqMhz', ...LINE_CONSTANTS];
const NULLABLE: CableField[] = ['attenuationDbPer100m', 'attenuationFreqMhz', 'notes', 'lossSource', ...LINE_CONSTANTS];
/** Loss columns a file may leave out (older files): an entry it updates keeps what it has. */
const KEPT_WHEN_ABSENT: CableField[] = ['attenuation', 'lossSource', ...LINE_CONSTANTS, 'pulseVfs'];
const COLUMN_TO_FIELD = new Map(Object.entries(CSV_COLUMNS).map(([f, c]) => [c, f as CableField]));
const NUMBER_RE = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

export const MAX_IMPORT_ROWS = 2000;

/**
 * The library column a header cell most likely meant: one that starts with it or holds it as a word
 * ("z0" → z0_ohm, "tolerance" → vf_tolerance), or one within two edits of it (a typo); none when the
 * cell is shorter than two letters or nothing is near.
 */
export function likelyColumn(cell: string): string | null {
  const c = cell.trim().toLowerCase().replace(/[\s-]+/g, '_');
  if (c.length < 2 || c.length > 60) return null;
  const all = Object.values(CSV_COLUMNS);
  const byWord = all.filter((k) => k === c || k.startsWith(`${c}_`) || k.endsWith(`_${c}`) || k.includes(`_${c}_`));
  if (byWord.length === 1) return byWord[0];
  let best: string | null = null;
  let bestD = 3;
  for (const k of all) {
    const d = editDistance(c, k, bestD);
    if (d < bestD) [best, bestD] = [k, d];
  }
  return best;
}

/** Levenshtein distance of two short strings, or `cap` once it reaches it. */
function editDistance(a: string, b: string, cap: number): number {
  if (Math.abs(a.length - b.length) >= cap) return cap;
  let prev = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const row = [i];
    for (let j = 1; j <= b.length; j++) row[j] = Math.min(prev[j] + 1, row[j - 1] + 1, prev[j - 1] + (a[i - 1] === b[j - 1] ? 0 : 1));
    if (Math.min(...row) >= cap) return cap;
    prev = row;
  }
  return Math.min(prev[b.length], cap);
}

export async function exportCsv(): Promise<string> {
  const rows = await CableType.findAll({ order: [['name', 'ASC']] });
  return stringify(
    rows.map((c) =>
      CABLE_FIELDS.map((f) => {
        const value = (LIST_FIELDS as readonly string[]).includes(f) ? (historyValue(f, c[f]) ?? '') : (c[f] ?? '');
        // Text only: a number column keeps its sign (see csv-cells.ts).
        return typeof value === 'string' ? protectCell(value) : value;
      }),
    ),
    // The byte-order mark tells a spreadsheet the file is UTF-8, so Ω, μ and – open as written.
    { header: true, bom: true, columns: CABLE_FIELDS.map((f) => CSV_COLUMNS[f]) },
  );
}

export type ImportAction = 'create' | 'update' | 'unchanged' | 'invalid';

export interface ImportRow {
  /** The file's line where the row starts (the header is line 1). */
  line: number;
  name: string;
  action: ImportAction;
  existingId: number | null;
  changes: FieldChange[];
  errors: FieldIssue[];
}

export interface ImportPreview {
  rows: ImportRow[];
  counts: Record<ImportAction, number>;
  /** True when there are no invalid rows and at least one row to write. */
  canCommit: boolean;
}

interface ParsedRow extends ImportRow {
  input: CableTypeInput | null;
}

function fileError(message: string, line?: number): AppError {
  return new AppError(422, 'csv_unreadable', message, line ? { fields: [{ field: 'file', message, line }] } : { fields: [{ field: 'file', message }] });
}

/**
 * Offset of the first byte that does not belong to well-formed UTF-8 (RFC 3629,
 * table 3-7 of the Unicode standard: no overlong forms, no surrogates, nothing
 * past U+10FFFF), or -1 when all of it is.
 */
function firstNonUtf8Byte(b: Uint8Array): number {
  let i = 0;
  while (i < b.length) {
    const c = b[i];
    if (c < 0x80) {
      i++;
      continue;
    }
    // The continuation bytes each lead byte needs, and the range its first one must fall in.
    let need: number;
    let lo = 0x80;
    let hi = 0xbf;
    if (c >= 0xc2 && c <= 0xdf) need = 1;
    else if (c >= 0xe0 && c <= 0xef) {
      need = 2;
      if (c === 0xe0) lo = 0xa0;
      if (c === 0xed) hi = 0x9f;
    } else if (c >= 0xf0 && c <= 0xf4) {
      need = 3;
      if (c === 0xf0) lo = 0x90;
      if (c === 0xf4) hi = 0x8f;
    } else return i;
    for (let k = 1; k <= need; k++) {
      const d = b[i + k];
      if (d === undefined || d < (k === 1 ? lo : 0x80) || d > (k === 1 ? hi : 0xbf)) return i;
    }
    i += need + 1;
  }
  return -1;
}

/**
 * An uploaded library file as text. It must be UTF-8 (what the export writes, and what spreadsheets
 * save as "CSV UTF-8"): bytes of another encoding would otherwise be read as replacement characters
 * and stored in names and references for good. Refused with the line and the byte.
 */
export function csvFileText(bytes: Uint8Array): string {
  // UTF-16 with its byte-order mark (some spreadsheets' "Unicode text") says what it is: read it as such.
  if (bytes.length >= 2 && ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff))) {
    try {
      return new TextDecoder(bytes[0] === 0xff ? 'utf-16le' : 'utf-16be', { fatal: true }).decode(bytes.subarray(2));
    } catch {
      throw fileError('The file starts as UTF-16 text but holds bytes that are not UTF-16. Save it from the spreadsheet as "CSV UTF-8" and import it again.', 1);
    }
  }
  // A NUL byte is valid UTF-8 but never in a library file: UTF-16 without its mark, or not text at all.
  const nul = bytes.indexOf(0);
  if (nul >= 0) {
    let line = 1;
    for (let i = 0; i < nul; i++) if (bytes[i] === 0x0a) line++;
    throw fileError(
      `Line ${line}: the file holds a NUL byte (0x00), so it is not UTF-8 text: it looks like UTF-16 saved without its byte-order mark, or not a text file at all. Save it from the spreadsheet as "CSV UTF-8" and import it again.`,
      line,
    );
  }
  const bad = firstNonUtf8Byte(bytes);
  if (bad >= 0) {
    const lineStart = bytes.lastIndexOf(0x0a, bad - 1) + 1;
    let line = 1;
    for (let i = 0; i < lineStart; i++) if (bytes[i] === 0x0a) line++;
    const before = new TextDecoder('utf-8').decode(bytes.subarray(lineStart, bad)).replace(/^\uFEFF/, '').slice(-20);
    const byte = `0x${bytes[bad].toString(16).toUpperCase().padStart(2, '0')}`;
    throw fileError(`Line ${line}: the file is not UTF-8 text (byte ${byte}${before ? ` after "${before}"` : ' at the start of the line'}). Save it from the spreadsheet as "CSV UTF-8" and import it again.`, line);
  }
  return new TextDecoder('utf-8').decode(bytes);
}

/**
 * The cell separator: a comma, or a semicolon as spreadsheets write CSV
 * where the comma is the decimal mark. Decided from the header line, outside
 * quotes: whichever of the two it has more of.
 */
export function csvDelimiter(text: string): ',' | ';' {
  // A header is a few hundred characters: the first 64 KiB of the first line decide, however long a hostile one is.
  const first = text.slice(0, 65_536).replace(/^\uFEFF/, '');
  const header = first.slice(0, first.search(/\r?\n|$/)).replace(/"[^"]*"/g, '');
  let commas = 0;
  let semicolons = 0;
  for (const ch of header) {
    if (ch === ',') commas++;
    else if (ch === ';') semicolons++;
  }
  const count = (c: string) => (c === ',' ? commas : semicolons);
  return count(';') > count(',') ? ';' : ',';
}

type CsvRecord = { record: string[]; info: { lines: number } };

/** How much of a file is read between turns of the event loop. */
const READ_SLICE_BYTES = 4 * 1024;

/**
 * The file's records, read a slice at a time with a turn of the event loop between slices: a file of a megabyte of
 * delimiters or of empty rows costs the reader seconds, and read in one go it held every other request (sign-ins,
 * uploads, pages) for all of them. The reading stops at the first row past the limit.
 */
export async function readRecords(text: string, delimiter: ',' | ';'): Promise<CsvRecord[]> {
  if (text.includes('\u0000')) throw fileError('The file is not a text CSV file.');
  const parser = new Parser({ bom: true, delimiter, skip_empty_lines: true, trim: true, info: true, relax_column_count: true });
  const records: CsvRecord[] = [];
  let failure: unknown = null;
  parser.on('data', (r: CsvRecord) => records.push(r));
  parser.on('error', (err) => (failure ??= err));
  const ended = new Promise<void>((resolve) => parser.once('end', resolve).once('close', resolve));
  const bytes = Buffer.from(text, 'utf8');
  const tooMany = () => records.length - 1 > MAX_IMPORT_ROWS;
  for (let at = 0; at < bytes.length && failure === null && !tooMany(); at += READ_SLICE_BYTES) {
    parser.write(bytes.subarray(at, at + READ_SLICE_BYTES));
    await new Promise((resolve) => setImmediate(resolve));
  }
  if (failure === null && !tooMany()) {
    parser.end();
    await Promise.race([ended, new Promise((resolve) => parser.once('error', resolve))]);
  } else parser.destroy();
  if (failure instanceof CsvError) {
    // A quote never closed is noticed at the end of the file: the line named is the one where it was opened.
    const end = (failure as CsvError & { lines?: number }).lines;
    const line = (failure.code === 'CSV_QUOTE_NOT_CLOSED' ? unclosedQuoteLine(text.replace(/^\uFEFF/, ''), 1) : null) ?? end;
    const why = csvTrouble(failure.code);
    throw fileError(`The file cannot be read${line ? ` at line ${line}` : ''}: ${why}.`, line);
  }
  if (failure !== null) throw failure;
  if (tooMany()) throw fileError(`The file has more than ${MAX_IMPORT_ROWS} rows; import at most ${MAX_IMPORT_ROWS} at a time.`);
  return records;
}

function cellToValue(field: CableField, cell: string, decimalComma: boolean): { value?: unknown; error?: string } {
  const raw = NUMERIC.includes(field) ? cell : unprotectCell(cell);
  if (field === 'attenuation' || field === 'pulseVfs') {
    const read = field === 'attenuation' ? parseAttenuationList(raw) : parsePulseVfList(raw);
    return read.ok ? { value: read.value } : { error: read.error };
  }
  if (raw === '') return NULLABLE.includes(field) ? { value: null } : { error: 'is required' };
  // As in a JSON body (strict-input.ts): the text would show in another order than it is stored.
  if (!NUMERIC.includes(field) && findBidiControl(raw)) return { error: 'must not contain text-direction controls (U+202A–U+202E, U+2066–U+2069)' };
  if (!NUMERIC.includes(field)) return { value: raw };
  // In a semicolon file the comma is the decimal mark ("0,66"); in a comma file it cannot be.
  if (decimalComma && /^[-+]?\d+,\d+([eE][-+]?\d+)?$/.test(raw)) return cellToValue(field, raw.replace(',', '.'), false);
  if (/^\d+,\d+$/.test(raw)) return { error: `"${raw}" must be a number with a point for decimals` };
  if (!NUMBER_RE.test(raw)) return { error: `"${raw}" is not a number` };
  const n = Number(raw);
  if (field === 'vf' && n >= 20 && n <= 100) return { error: `${raw} must be at most 1: write the VF as a fraction (${(n / 100).toFixed(2)}), not a percentage` };
  return { value: n };
}

/** Parses and checks every row against the schema and the library; writes nothing. */
export async function parseImport(text: string, transaction?: Transaction): Promise<ParsedRow[]> {
  const delimiter = csvDelimiter(text);
  return checkRecords(await readRecords(text, delimiter), delimiter, transaction);
}

/** Checks read records against the schema and the library; writes nothing. */
async function checkRecords(records: CsvRecord[], delimiter: ',' | ';', transaction?: Transaction): Promise<ParsedRow[]> {
  if (records.length === 0) throw fileError('The file is empty: it needs a header row and at least one cable type.');
  const columns = Object.keys(CSV_COLUMNS).length;
  if (records[0].record.length > 2 * columns) {
    throw fileError(`Line 1: the header has ${records[0].record.length} columns; a library file has at most ${columns}: ${Object.values(CSV_COLUMNS).join(', ')}.`, 1);
  }
  const header = records[0].record.map((h) => h.trim().toLowerCase());
  const headerFields = header.map((h) => COLUMN_TO_FIELD.get(h));
  const unknown = header.filter((_h, i) => !headerFields[i]);
  if (unknown.length) {
    // Named up to ten: a header of a million empty cells is not said back a million times.
    // Each with the column it most likely meant; the needed columns are listed (the optional loss and pulse
    // columns are in the import help and in an export), so the message stays whole under the message cap.
    const named =
      unknown
        .slice(0, 10)
        .map((u) => {
          const meant = likelyColumn(u);
          return meant ? `"${u}" (perhaps "${meant}")` : `"${u}"`;
        })
        .join(', ') + (unknown.length > 10 ? ` and ${unknown.length - 10} more` : '');
    throw fileError(
      `Line 1: unknown column${unknown.length > 1 ? 's' : ''} ${named}. Needed: ${REQUIRED_COLUMNS.map((f) => CSV_COLUMNS[f]).join(', ')}; the optional columns are in the import help.`,
      1,
    );
  }
  const missing = REQUIRED_COLUMNS.filter((f) => !headerFields.includes(f)).map((f) => CSV_COLUMNS[f]);
  if (missing.length) throw fileError(`Line 1: the header lacks ${missing.join(', ')}.`, 1);
  const dupes = header.filter((h, i) => header.indexOf(h) !== i);
  if (dupes.length) throw fileError(`Line 1: the column "${dupes[0]}" appears twice.`, 1);

  const existing = await CableType.findAll({ transaction });
  const byName = new Map(existing.map((c) => [cableNameKey(c.name), c]));
  const seen = new Map<string, number>();
  const rows: ParsedRow[] = [];

  for (const { record, info } of records.slice(1)) {
    const newlinesInside = record.reduce((n, cell) => n + (cell.match(/\n/g)?.length ?? 0), 0);
    const line = info.lines - newlinesInside;
    const errors: FieldIssue[] = [];
    const nameIndex = headerFields.indexOf('name');
    const name = unprotectCell(record[nameIndex] ?? '');
    if (record.length !== header.length) {
      errors.push({ field: '(row)', message: `has ${record.length} fields, the header has ${header.length}`, line });
      rows.push({ line, name, action: 'invalid', existingId: null, changes: [], errors, input: null });
      continue;
    }
    const candidate: Record<string, unknown> = {};
    const stored = byName.get(cableNameKey(name));
    if (stored) for (const f of KEPT_WHEN_ABSENT) if (!headerFields.includes(f)) candidate[f] = stored[f];
    headerFields.forEach((field, i) => {
      const { value, error } = cellToValue(field!, record[i], delimiter === ';');
      if (error) errors.push({ field: CSV_COLUMNS[field!], message: error, line });
      else candidate[field!] = value;
    });
    let input: CableTypeInput | null = null;
    const parsed = CableTypeInputSchema.safeParse(candidate);
    if (parsed.success && errors.length === 0) input = parsed.data;
    else if (!parsed.success) {
      // Fields whose cell could not be read are reported once, by the cell check above.
      const unreadable = new Set(errors.map((e) => e.field));
      for (const issue of parsed.error.issues) {
        const column = CSV_COLUMNS[issue.path[0] as CableField] ?? String(issue.path[0] ?? '(row)');
        if (!unreadable.has(column)) errors.push({ field: column, message: issueWords(issue), line });
      }
    }
    const key = cableNameKey(name);
    if (key && seen.has(key)) errors.push({ field: 'name', message: `appears again (first on line ${seen.get(key)})`, line });
    else if (key) seen.set(key, line);

    const match = key ? (byName.get(key) ?? null) : null;
    if (errors.length || !input) {
      rows.push({ line, name, action: 'invalid', existingId: match?.id ?? null, changes: [], errors, input: null });
      continue;
    }
    if (match) {
      // Matched by name ignoring letter case; the library's spelling stays.
      const same = { ...input, name: match.name };
      const changes = diffCable(match, same);
      rows.push({ line, name: match.name, action: changes.length ? 'update' : 'unchanged', existingId: match.id, changes, errors, input: same });
    } else {
      rows.push({ line, name: input.name, action: 'create', existingId: null, changes: diffCable(null, input), errors, input });
    }
  }
  return rows;
}

function summarise(rows: ParsedRow[]): ImportPreview {
  const counts: Record<ImportAction, number> = { create: 0, update: 0, unchanged: 0, invalid: 0 };
  for (const r of rows) counts[r.action] += 1;
  return {
    rows: rows.map(({ input: _input, ...r }) => r),
    counts,
    canCommit: counts.invalid === 0 && counts.create + counts.update > 0,
  };
}

export async function previewImport(text: string): Promise<ImportPreview> {
  return summarise(await parseImport(text));
}

/** Cable types written by one INSERT: well inside SQLite's and PostgreSQL's limits on bound values (about 30 columns each). */
const INSERT_CHUNK = 200;

/** The columns an import's update may change (every field of an entry but its name, which keeps the library's spelling). */
const UPDATED_COLUMNS = [...CABLE_FIELDS.filter((f) => f !== 'name'), 'revision', 'updatedAt'] as const;

/** What the library looked like when a file was checked: every entry's id, name key and last change. */
function libraryState(rows: Array<Pick<CableType, 'id' | 'nameKey' | 'revision' | 'updatedAt'>>): string {
  return rows
    .map((c) => `${c.id}:${c.nameKey}:${c.revision}:${new Date(c.updatedAt).getTime()}`)
    .sort()
    .join('|');
}

function refuseInvalid(rows: ParsedRow[]) {
  const preview = summarise(rows);
  if (preview.counts.invalid > 0) {
    const bad = preview.rows.filter((r) => r.action === 'invalid');
    throw new AppError(
      422,
      'import_invalid',
      `Nothing was imported: ${bad.length} row${bad.length > 1 ? 's have' : ' has'} errors (line${bad.length > 1 ? 's' : ''} ${bad.map((r) => r.line).join(', ')}).`,
      { fields: bad.flatMap((r) => r.errors), rows: preview.rows, counts: preview.counts },
    );
  }
  if (!preview.canCommit) throw new AppError(422, 'import_empty', 'Nothing to import: every row matches the library already.');
  return preview;
}

/**
 * Writes the whole file or nothing, in one transaction that is kept short so other saves are not held up for long.
 *
 * The file is read and every row checked against the library first, outside any write turn (that is the slow
 * part). The transaction then only writes: it first makes sure the library is still as the check saw it (every
 * entry's id, name key and last change; if anything moved meanwhile, the rows are checked again inside it), then
 * adds the new entries a few hundred per INSERT with their history rows in as few, and applies each update with its
 * history row. The database's own transaction is what makes it all or nothing, including when the process is killed
 * half way: nothing of a transaction that did not commit is ever seen, on SQLite or PostgreSQL, so there is no
 * half-imported state to publish or clean up.
 */
export async function commitImport(text: string, opts: { reason: string; userId: number; fileName?: string }) {
  const sequelize = CableType.sequelize!;
  const checkedAgainst = await CableType.findAll({ attributes: ['id', 'nameKey', 'revision', 'updatedAt'] });
  // Read once, outside the transaction: the check is made again inside it only when the library changed meanwhile.
  const delimiter = csvDelimiter(text);
  const records = await readRecords(text, delimiter);
  const checked = await checkRecords(records, delimiter);
  const preview = refuseInvalid(checked);
  const reason = opts.fileName ? `Import of ${opts.fileName}: ${opts.reason}` : `Import: ${opts.reason}`;
  return sequelize.transaction(async (transaction) => {
    // PostgreSQL runs transactions side by side: hold off other writers of the library until this one ends
    // (as a single entry's name check does), so the state compared below stays true until the commit.
    if (sequelize.getDialect() === 'postgres') await sequelize.query('LOCK TABLE cable_types IN SHARE ROW EXCLUSIVE MODE', { transaction });
    const now = await CableType.findAll({ attributes: ['id', 'nameKey', 'revision', 'updatedAt'], transaction });
    let rows = checked;
    let result = preview;
    if (libraryState(now) !== libraryState(checkedAgainst)) {
      rows = await checkRecords(records, delimiter, transaction);
      result = refuseInvalid(rows);
    }
    const creates = rows.filter((r) => r.action === 'create');
    for (let i = 0; i < creates.length; i += INSERT_CHUNK) {
      const chunk = creates.slice(i, i + INSERT_CHUNK);
      await CableType.bulkCreate(
        chunk.map((r) => ({ ...r.input!, revision: 1 })),
        { transaction, validate: true },
      );
      // Read the new ids back by name key (bulk inserts do not return them on every dialect).
      const added = await CableType.findAll({ where: { nameKey: chunk.map((r) => cableNameKey(r.input!.name)) }, attributes: ['id', 'nameKey'], transaction });
      const idOf = new Map(added.map((c) => [c.nameKey, c.id]));
      await CableTypeChange.bulkCreate(
        chunk.map((r) => ({
          cableTypeId: idOf.get(cableNameKey(r.input!.name))!,
          revision: 1,
          kind: 'import' as const,
          changes: r.changes,
          reason,
          changedById: opts.userId,
          calibrationId: null,
        })),
        { transaction },
      );
    }
    // Updates: the entries are read once, each change planned as a single edit would be (the same loss rules and
    // revision bump), then written a few hundred rows per statement (an insert that updates the existing row by id).
    const updates = rows.filter((r) => r.action === 'update');
    for (let i = 0; i < updates.length; i += INSERT_CHUNK) {
      const chunk = updates.slice(i, i + INSERT_CHUNK);
      const stored = new Map((await CableType.findAll({ where: { id: chunk.map((r) => r.existingId!) }, transaction })).map((c) => [c.id, c]));
      const planned = chunk.map((r) => {
        const cable = stored.get(r.existingId!);
        if (!cable) throw AppError.notFound(`Cable type ${r.existingId}`);
        return { cable, ...planUpdate(cable, r.input!) };
      });
      const writing = planned.filter((p) => p.changes.length > 0);
      await CableType.bulkCreate(
        writing.map((p) => ({ ...p.cable.get({ plain: true }), ...p.patch, revision: p.revision, updatedAt: new Date() })),
        { transaction, validate: true, updateOnDuplicate: [...UPDATED_COLUMNS] },
      );
      await CableTypeChange.bulkCreate(
        writing.map((p) => ({ cableTypeId: p.cable.id, revision: p.revision, kind: 'import' as const, changes: p.changes, reason, changedById: opts.userId, calibrationId: null })),
        { transaction },
      );
    }
    return { counts: result.counts, rows: result.rows };
  });
}
