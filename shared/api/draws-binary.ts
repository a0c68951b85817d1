/**
 * Draws for plots in a compact columnar form (GET …/runs/:id/draws.bin): the same content as the
 * JSON `RunDraws`, with the numbers as Float32 columns instead of JSON text (a fifth of the bytes
 * or less, and no number parsing in the page).
 *
 *   bytes 0–3   "SLD1"
 *   bytes 4–7   header length h (uint32, little-endian)
 *   h bytes     header: UTF-8 JSON { names, unknownCount, thin, region, projections,
 *               chains: [{ chain, n, divergent: [indices of divergent kept draws] }] }
 *   zero bytes  up to the next multiple of 4
 *   then        for each chain in header order, for each quantity in `names` order, n Float32
 *               values (little-endian): the kept draws, thinned once on the server
 */
import type { RunDraws } from './notebook';

export const DRAWS_BINARY_MAGIC = 'SLD1';

export interface DrawsBinaryHeader extends Omit<RunDraws, 'chains'> {
  chains: { chain: number; n: number; divergent: number[] }[];
}

const pad4 = (n: number) => (n + 3) & ~3;

/** `columns[c][q]` holds chain c's kept draws of quantity q. */
export function encodeDrawsBinary(header: DrawsBinaryHeader, columns: Float32Array[][]): Uint8Array {
  const head = new TextEncoder().encode(JSON.stringify(header));
  const start = pad4(8 + head.length);
  const floats = columns.reduce((s, ch) => s + ch.reduce((t, col) => t + col.length, 0), 0);
  const out = new Uint8Array(start + 4 * floats);
  out.set(new TextEncoder().encode(DRAWS_BINARY_MAGIC), 0);
  new DataView(out.buffer).setUint32(4, head.length, true);
  out.set(head, 8);
  const view = new DataView(out.buffer);
  let at = start;
  for (const ch of columns)
    for (const col of ch)
      for (let i = 0; i < col.length; i++, at += 4) view.setFloat32(at, col[i], true);
  return out;
}

/** Back to the JSON shape the plots take (values[q][t] per chain, divergent as 0/1 per kept draw). */
export function decodeDrawsBinary(buf: ArrayBuffer): RunDraws {
  const bytes = new Uint8Array(buf);
  if (new TextDecoder().decode(bytes.subarray(0, 4)) !== DRAWS_BINARY_MAGIC) throw new Error('Not a draws file of this version');
  const view = new DataView(buf);
  const h = view.getUint32(4, true);
  const header = JSON.parse(new TextDecoder().decode(bytes.subarray(8, 8 + h))) as DrawsBinaryHeader;
  let at = pad4(8 + h);
  const q = header.names.length;
  const chains = header.chains.map((c) => {
    const values: number[][] = [];
    for (let k = 0; k < q; k++) {
      const col = new Array<number>(c.n);
      for (let i = 0; i < c.n; i++, at += 4) col[i] = view.getFloat32(at, true);
      values.push(col);
    }
    const divergent = new Array<number>(c.n).fill(0);
    for (const i of c.divergent) divergent[i] = 1;
    return { chain: c.chain, values, divergent };
  });
  if (at !== buf.byteLength) throw new Error('The draws file has the wrong length');
  const { chains: _c, ...rest } = header;
  return { ...rest, chains };
}
