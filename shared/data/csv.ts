/**
 * CSV → data table, for the headless fit command and the notebook's data cell (browser-safe: no
 * Node APIs; TextDecoder exists in browsers and Node).
 *
 * Parsing by papaparse; on top of it:
 * - decoding: bytes are decoded as UTF-8 (a UTF-8 byte-order mark is dropped), or UTF-16 when the
 *   bytes start with a UTF-16 byte-order mark; invalid bytes become U+FFFD and are reported with
 *   their row and column ("not UTF-8");
 * - the first row must be a header of distinct, non-empty column names; a first row made only of
 *   numbers is reported as a missing header;
 * - rows with more or fewer cells than the header are reported (ragged rows), one message per row
 *   ("Row 3 has 2 cells; the header has 3.");
 * - cells are trimmed; a cell is missing when it is empty or one of MISSING_TOKENS (any case);
 *   missing cells become NaN and are reported per column with their rows;
 * - column types: `integer` when every present cell is a whole number, `numeric` when every present
 *   cell is a decimal number, otherwise `category`, coded 1..K in the order of the levels sorted
 *   by natural string order (so "dose 2" comes before "dose 10").
 *
 * Row numbers in messages count data rows from 1 (the header is not counted); column names are the
 * header's. Every message names its own row and column, so it reads whole without a prefix
 * (`row` and `column` are there for tools that sort or point at cells).
 */
import Papa from 'papaparse';
import type { ParsedTable, TableColumn } from './types';

export const MISSING_TOKENS = ['', 'na', 'n/a', 'nan', 'null'] as const;

const NUMBER_RE = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
/** Names a model can refer to: a letter or underscore, then letters, digits, underscores. */
const IDENTIFIER_RE = /^[A-Za-z_][A-Za-z0-9_]*$/;

/**
 * Whether a model can refer to this column by name: the model language's rule for names
 * (docs/language.md): letters, digits and underscores, starting with a letter or underscore, with
 * at least one letter, at most 64 characters.
 */
export function isModelName(name: string): boolean {
  return IDENTIFIER_RE.test(name) && /[A-Za-z]/.test(name) && name.length <= 64;
}

/**
 * A name a model could use for a column whose header it cannot: runs of other characters become
 * one underscore ("temp level" → "temp_level", "yield (t/ha)" → "yield_t_ha"); a name that would
 * start with a digit gets "c_" in front.
 */
export function modelNameFor(name: string): string {
  let s = name.trim().replace(/[^A-Za-z0-9_]+/g, '_').replace(/^_+|_+$/g, '');
  if (s === '') s = 'column';
  if (!/^[A-Za-z]/.test(s)) s = `c_${s}`;
  return s.slice(0, 64).replace(/_+$/, '');
}

/**
 * The warning for a column name a model cannot use: the file is still stored, and the message says
 * what to rename it to (the model language has no quoting for such names).
 */
export function columnNameWarning(name: string): string {
  return `Column name "${name}" cannot be used in a model (a name is letters, digits and underscores, starts with a letter, at most 64 characters): rename it in the file, e.g. to ${modelNameFor(name)}, and upload it again; the table is stored and its other columns can be used.`;
}

export interface CsvIssue {
  severity: 'error' | 'warning';
  /** 1-based data row (header excluded), when the issue is tied to a row. */
  row?: number;
  /** Column name (or "column 3" when the header has none), when tied to a column. */
  column?: string;
  message: string;
}

export interface ColumnInfo {
  name: string;
  type: TableColumn['type'];
  /** Number of missing cells and the first few of their rows (1-based). */
  missing: number;
  missingRows: number[];
  levels?: string[];
  min?: number;
  max?: number;
}

export interface CsvResult {
  /** The table, or null when there is an error. */
  table: ParsedTable | null;
  columns: ColumnInfo[];
  issues: CsvIssue[];
}

export interface CsvOptions {
  /** Field delimiter; detected by papaparse when absent. */
  delimiter?: string;
  /** At most this many rows listed per issue kind (default 5). */
  maxListed?: number;
}

/** Decodes bytes to text: UTF-16 by its byte-order mark, otherwise UTF-8 (BOM dropped). */
export function decodeBytes(bytes: Uint8Array | ArrayBuffer): string {
  const u8 = bytes instanceof Uint8Array ? bytes : new Uint8Array(bytes);
  if (u8.length >= 2 && u8[0] === 0xff && u8[1] === 0xfe) return new TextDecoder('utf-16le').decode(u8);
  if (u8.length >= 2 && u8[0] === 0xfe && u8[1] === 0xff) return new TextDecoder('utf-16be').decode(u8);
  // TextDecoder drops a leading UTF-8 BOM and replaces invalid sequences with U+FFFD.
  return new TextDecoder('utf-8').decode(u8);
}

function naturalCompare(a: string, b: string): number {
  return a.localeCompare(b, 'en', { numeric: true, sensitivity: 'variant' });
}

function isMissing(cell: string): boolean {
  return (MISSING_TOKENS as readonly string[]).includes(cell.toLowerCase());
}

function listRows(rows: number[], total: number): string {
  const shown = rows.join(', ');
  return total > rows.length ? `${shown} and ${total - rows.length} more` : shown;
}

/** Parses CSV text or bytes into a data table with column information and every issue found. */
export function parseCsv(input: string | Uint8Array | ArrayBuffer, opts: CsvOptions = {}): CsvResult {
  const maxListed = opts.maxListed ?? 5;
  let text = typeof input === 'string' ? input : decodeBytes(input);
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  const issues: CsvIssue[] = [];

  // NUL characters have no place in a text table (a binary file, or UTF-16 without its
  // byte-order mark); stored, they would reach previews, exports and models verbatim.
  const nul = text.indexOf('\u0000');
  if (nul >= 0) {
    const line = text.slice(0, nul).split(/\r\n|\r|\n/).length;
    issues.push({
      severity: 'error',
      message: `The file contains NUL characters (code 0), first on line ${line}: it is not a plain-text CSV. Save it as CSV (UTF-8) and upload it again.`,
    });
    return { table: null, columns: [], issues };
  }

  const parsed = Papa.parse<string[]>(text, {
    header: false,
    skipEmptyLines: 'greedy',
    dynamicTyping: false,
    ...(opts.delimiter ? { delimiter: opts.delimiter } : {}),
  });
  for (const e of parsed.errors) {
    // UndetectableDelimiter is harmless for one-column files; anything else is a real problem.
    if (e.code === 'UndetectableDelimiter') continue;
    issues.push({
      severity: 'error',
      ...(e.row !== undefined && e.row !== null ? { row: e.row } : {}),
      message: `${e.message}${e.row !== undefined && e.row !== null ? ` (row ${e.row})` : ''}`,
    });
  }
  const records = parsed.data;
  if (records.length === 0) {
    issues.push({ severity: 'error', message: 'The file is empty: a header row with column names is required.' });
    return { table: null, columns: [], issues };
  }

  const header = records[0].map((h) => h.trim());
  const body = records.slice(1);
  const colLabel = (j: number) => (header[j] ? header[j] : `column ${j + 1}`);

  // Header checks.
  if (header.every((h) => h !== '' && NUMBER_RE.test(h))) {
    issues.push({
      severity: 'error',
      message: 'The first row holds only numbers: the file seems to lack a header row with column names.',
    });
  }
  const seen = new Map<string, number>();
  header.forEach((h, j) => {
    if (h.includes('\ufffd')) {
      issues.push({
        severity: 'error',
        column: colLabel(j),
        message: `The name of column ${j + 1} has characters that are not valid UTF-8: save the file as UTF-8.`,
      });
    }
    if (h === '') {
      issues.push({ severity: 'error', column: colLabel(j), message: `Column ${j + 1} has no name in the header row.` });
    } else if (h in Object.prototype) {
      // "__proto__", "constructor", "toString"…: names every JavaScript object already answers to.
      issues.push({
        severity: 'error',
        column: h,
        message: `Column name "${h}" is reserved: rename column ${j + 1} (letters, digits and underscores, starting with a letter).`,
      });
    } else if (seen.has(h)) {
      issues.push({
        severity: 'error',
        column: h,
        message: `Column name "${h}" appears twice (columns ${seen.get(h)! + 1} and ${j + 1}).`,
      });
    } else {
      seen.set(h, j);
      if (!isModelName(h)) {
        issues.push({
          severity: 'warning',
          column: h,
          message: columnNameWarning(h),
        });
      }
    }
  });

  // Ragged rows: one message per row (up to maxListed of each kind), naming the row once and
  // saying what is wrong, then one line for the rest.
  const ragged = (kind: 'fewer' | 'more') => {
    const rows: { row: number; cells: number }[] = [];
    body.forEach((r, i) => {
      if (kind === 'fewer' ? r.length < header.length : r.length > header.length) rows.push({ row: i + 1, cells: r.length });
    });
    const cellWord = (n: number) => `${n} cell${n === 1 ? '' : 's'}`;
    for (const { row, cells } of rows.slice(0, maxListed)) {
      issues.push({ severity: 'error', row, message: `Row ${row} has ${cellWord(cells)}; the header has ${header.length}.` });
    }
    const rest = rows.length - maxListed;
    if (rest > 0) {
      issues.push({
        severity: 'error',
        message: `${rest} more row${rest > 1 ? 's have' : ' has'} ${kind} cells than the header's ${header.length}.`,
      });
    }
  };
  ragged('fewer');
  ragged('more');

  // Columns.
  const nRows = body.length;
  const columns: ColumnInfo[] = [];
  const tableColumns: Record<string, TableColumn> = {};
  for (let j = 0; j < header.length; j++) {
    const name = colLabel(j);
    const cells = body.map((r) => (r[j] ?? '').trim());
    const missingRows: number[] = [];
    let missing = 0;
    let allNumeric = true;
    let allInteger = true;
    let badEncodingRow = 0;
    for (let i = 0; i < nRows; i++) {
      const c = cells[i];
      if (c.includes('\ufffd') && !badEncodingRow) badEncodingRow = i + 1;
      if (isMissing(c)) {
        missing++;
        if (missingRows.length < maxListed) missingRows.push(i + 1);
        continue;
      }
      if (!NUMBER_RE.test(c)) {
        allNumeric = false;
        allInteger = false;
      } else if (allInteger) {
        const v = Number(c);
        if (!Number.isInteger(v) || Math.abs(v) > Number.MAX_SAFE_INTEGER) allInteger = false;
      }
    }
    if (badEncodingRow) {
      issues.push({
        severity: 'error',
        row: badEncodingRow,
        column: name,
        message: `Row ${badEncodingRow}, column "${name}" has characters that are not valid UTF-8: save the file as UTF-8.`,
      });
    }
    if (missing > 0) {
      issues.push({
        severity: 'warning',
        row: missingRows[0],
        column: name,
        message: `Column "${name}" has ${missing} missing value${missing > 1 ? 's' : ''} (row${missing > 1 ? 's' : ''} ${listRows(missingRows, missing)}).`,
      });
    }
    const values = new Float64Array(nRows);
    let info: ColumnInfo;
    if (missing === nRows) {
      values.fill(NaN);
      info = { name, type: 'numeric', missing, missingRows };
      if (nRows > 0) {
        issues.push({ severity: 'warning', column: name, message: `Column "${name}" has no values.` });
      }
      tableColumns[name] = { type: 'numeric', values };
    } else if (allNumeric) {
      let min = Infinity;
      let max = -Infinity;
      for (let i = 0; i < nRows; i++) {
        const v = isMissing(cells[i]) ? NaN : Number(cells[i]);
        values[i] = v;
        if (v < min) min = v;
        if (v > max) max = v;
      }
      const type = allInteger ? 'integer' : 'numeric';
      info = { name, type, missing, missingRows, min, max };
      tableColumns[name] = { type, values };
    } else {
      const levels = [...new Set(cells.filter((c) => !isMissing(c)))].sort(naturalCompare);
      const code = new Map(levels.map((l, k) => [l, k + 1]));
      for (let i = 0; i < nRows; i++) values[i] = isMissing(cells[i]) ? NaN : code.get(cells[i])!;
      info = { name, type: 'category', missing, missingRows, levels };
      tableColumns[name] = { type: 'category', values, levels };
    }
    columns.push(info);
  }

  const hasError = issues.some((i) => i.severity === 'error');
  return {
    table: hasError ? null : { rows: nRows, columns: tableColumns },
    columns,
    issues,
  };
}
