/**
 * A parsed table as stored beside its CSV (datasets.table_columns): typed columns, so a read copies
 * bytes and never parses text again.
 *
 *   bytes 0–3   "SLT1" (format tag)
 *   bytes 4–7   header length H, unsigned 32-bit little-endian
 *   8 … 8+H     header: UTF-8 JSON { rows, columns: [{ name, type, levels? }] }, padded with
 *               spaces to a multiple of 8 bytes
 *   then        per column in header order: `rows` Float64 little-endian (missing cells NaN,
 *               categories their 1-based codes, as in ParsedTable)
 *
 * Float64 keeps every value as the CSV reader produced it, so a table read back equals the parse.
 */
import type { ParsedTable, TableColumn } from '../../shared/data';

const TAG = [0x53, 0x4c, 0x54, 0x31]; // "SLT1"

interface Header {
  rows: number;
  columns: { name: string; type: TableColumn['type']; levels?: string[] }[];
}

export function encodeTableColumns(table: ParsedTable): Uint8Array {
  const header: Header = {
    rows: table.rows,
    columns: Object.entries(table.columns).map(([name, c]) => ({ name, type: c.type, ...(c.levels ? { levels: c.levels } : {}) })),
  };
  const raw = new TextEncoder().encode(JSON.stringify(header));
  const h = Math.ceil(raw.length / 8) * 8;
  const out = new Uint8Array(8 + h + header.columns.length * table.rows * 8);
  out.set(TAG, 0);
  const view = new DataView(out.buffer);
  view.setUint32(4, h, true);
  out.fill(0x20, 8, 8 + h);
  out.set(raw, 8);
  let off = 8 + h;
  for (const c of Object.values(table.columns)) {
    for (let i = 0; i < table.rows; i++, off += 8) view.setFloat64(off, c.values[i], true);
  }
  return out;
}

const littleEndian = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/**
 * The table back from its stored bytes. Each column is one copy of its bytes into a fresh
 * Float64Array (no per-value work on a little-endian machine), so the result owns its memory.
 */
export function decodeTableColumns(bytes: Uint8Array): ParsedTable {
  if (bytes.length < 8 || TAG.some((b, i) => bytes[i] !== b)) throw new Error('not a stored table');
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const h = view.getUint32(4, true);
  const header = JSON.parse(new TextDecoder().decode(bytes.subarray(8, 8 + h))) as Header;
  const n = header.rows;
  if (bytes.length !== 8 + h + header.columns.length * n * 8) throw new Error('a stored table has the wrong length');
  const columns: Record<string, TableColumn> = {};
  header.columns.forEach((c, k) => {
    const at = 8 + h + k * n * 8;
    const values = new Float64Array(n);
    if (littleEndian) new Uint8Array(values.buffer).set(bytes.subarray(at, at + n * 8));
    else for (let i = 0; i < n; i++) values[i] = view.getFloat64(at + i * 8, true);
    columns[c.name] = { type: c.type, values, ...(c.levels ? { levels: c.levels } : {}) };
  });
  return { rows: n, columns };
}
