/**
 * The columnar binary form in which draws travel to the plots (content type DRAWS_CONTENT_TYPE).
 *
 *   bytes 0–3   "SLD1" (format tag)
 *   bytes 4–7   header length H, unsigned 32-bit little-endian
 *   8 … 8+H     header: UTF-8 JSON (DrawsHeader: names, chains, draws per chain, thinning, dtype,
 *               the region and its projections), padded with spaces to a multiple of 4 bytes
 *   then        per chain, per quantity: `drawsPerChain` Float32 little-endian (column-major)
 *   then        per chain: `drawsPerChain` bytes, 1 where the transition diverged
 *
 * Float32 keeps about 7 significant digits, far below a pixel on any plot (a 2 000-pixel axis
 * needs fewer than 4); the CSV export and the summaries keep the stored Float64 draws.
 * Used by the server (encoding, on the compute pool) and the client (decoding into typed arrays).
 */
import { z } from 'zod';
import { regionProjectionSchema, regionSystemSchema } from './api/notebook';

export const DRAWS_CONTENT_TYPE = 'application/vnd.slackline.draws';
const TAG = [0x53, 0x4c, 0x44, 0x31]; // "SLD1"

export const drawsHeaderSchema = z.object({
  dtype: z.literal('float32'),
  names: z.array(z.string()),
  /** Number of unknown coordinates; names after these are derived quantities. */
  unknownCount: z.number().int().min(0),
  /** Keep every `thin`-th draw. */
  thin: z.number().int().min(1),
  drawsPerChain: z.number().int().min(0),
  /** Chain numbers (1-based) in the order of the blocks. */
  chains: z.array(z.number().int()),
  region: regionSystemSchema.nullable(),
  projections: z.array(regionProjectionSchema),
});
export type DrawsHeader = z.infer<typeof drawsHeaderSchema>;

/** Draws as the plots use them: values[q][t] is quantity q at kept iteration t. */
export interface RunDrawColumns {
  names: string[];
  unknownCount: number;
  thin: number;
  chains: { chain: number; values: Float32Array[]; divergent: Uint8Array }[];
  region: DrawsHeader['region'];
  projections: DrawsHeader['projections'];
}

/** What the plots read: the decoded columns, or plain arrays of the same shape. */
export interface PlotDraws {
  names: string[];
  unknownCount: number;
  thin: number;
  chains: { chain: number; values: ArrayLike<number>[]; divergent: ArrayLike<number> }[];
  region: DrawsHeader['region'];
  projections?: DrawsHeader['projections'];
}

/** Bytes of the body after the header: the float blocks, then the flags. */
export function drawsBodyLength(chains: number, quantities: number, drawsPerChain: number): number {
  return chains * quantities * drawsPerChain * 4 + chains * drawsPerChain;
}

/** The bytes before the body: tag, length and the JSON header padded to a multiple of 4. */
export function encodeDrawsHead(header: DrawsHeader): Uint8Array {
  let json = new TextEncoder().encode(JSON.stringify(header));
  const padded = Math.ceil(json.length / 4) * 4;
  if (padded !== json.length) {
    const p = new Uint8Array(padded).fill(0x20);
    p.set(json);
    json = p;
  }
  const out = new Uint8Array(8 + json.length);
  out.set(TAG, 0);
  new DataView(out.buffer).setUint32(4, json.length, true);
  out.set(json, 8);
  return out;
}

/**
 * The body from Float64 draw-major rows per chain (`dimension` values per draw, the first
 * `quantities` kept), taking draws at the indices `keep`.
 */
export function encodeDrawsBody(
  chains: { rows: Float64Array; dimension: number; divergent: Uint8Array }[],
  quantities: number,
  keep: readonly number[],
): Uint8Array {
  const n = keep.length;
  const out = new Uint8Array(drawsBodyLength(chains.length, quantities, n));
  const view = new DataView(out.buffer);
  let off = 0;
  for (const c of chains)
    for (let q = 0; q < quantities; q++)
      for (let k = 0; k < n; k++, off += 4) view.setFloat32(off, c.rows[keep[k] * c.dimension + q], true);
  for (const c of chains) for (let k = 0; k < n; k++) out[off++] = c.divergent[keep[k]] ? 1 : 0;
  return out;
}

const littleEndian = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/** Reads the whole response; the columns are views on (or, on a big-endian machine, copies of) its bytes. */
export function decodeRunDraws(buffer: ArrayBuffer): RunDrawColumns {
  const bytes = new Uint8Array(buffer);
  if (bytes.length < 8 || TAG.some((b, i) => bytes[i] !== b)) throw new Error('Not a draws response');
  const view = new DataView(buffer);
  const h = view.getUint32(4, true);
  if (8 + h > bytes.length) throw new Error('The draws response is cut short');
  const header = drawsHeaderSchema.parse(JSON.parse(new TextDecoder().decode(bytes.subarray(8, 8 + h))));
  const q = header.names.length;
  const n = header.drawsPerChain;
  const start = 8 + h;
  if (bytes.length - start !== drawsBodyLength(header.chains.length, q, n)) throw new Error('The draws response has the wrong length');
  const flagsAt = start + header.chains.length * q * n * 4;
  const chains = header.chains.map((chain, ci) => {
    const values = Array.from({ length: q }, (_, k) => {
      const at = start + (ci * q + k) * n * 4;
      if (littleEndian) return new Float32Array(buffer, at, n);
      const col = new Float32Array(n);
      for (let t = 0; t < n; t++) col[t] = view.getFloat32(at + t * 4, true);
      return col;
    });
    return { chain, values, divergent: new Uint8Array(buffer, flagsAt + ci * n, n) };
  });
  return { names: header.names, unknownCount: header.unknownCount, thin: header.thin, chains, region: header.region, projections: header.projections };
}
