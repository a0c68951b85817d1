/**
 * Vega-Lite specifications of the fit cell's checks against the data, built from the stored
 * checks (shared/checks.ts) so they can be tested without a browser.
 *
 * The look: each bin of the data's range is a column of its own. The replicated data sets'
 * shares of that bin form a stacked "gauge" (a pale 5–95 % bar, a darker 25–75 % core, a stroke
 * at the median), a row of small dots inside the bin shows single replicated data sets side by
 * side, and the data's own share sits on top as an ink lid with a dot at its centre — a dot in the
 * warning colour where the data leave the 5–95 % bar.
 */
import type { LooSummary, Overlay, StatCheckSummary } from '@shared/checks';
import { FONT_MONO, FONT_UI, PALETTE } from '@/lib/plot/palette';
import type { Spec } from '../components/plot-frame';
import { baseSpec } from '@/lib/plot/base-spec';

const base = baseSpec;

export interface OverlayBin {
  lo: number;
  hi: number;
  /** The gauge's and the lid's horizontal extent, inset from the bin's edges. */
  l: number;
  r: number;
  mid: number;
  observed: number;
  q05: number;
  q25: number;
  q50: number;
  q75: number;
  q95: number;
  /** The data's share lies outside the replicates' 5–95 % range. */
  outside: boolean;
}

/** One row per bin, plus one row per single replicate per bin (dots spread across the bin). */
export function overlayRows(o: Overlay): { bins: OverlayBin[]; dots: { x: number; share: number }[] } {
  const bins: OverlayBin[] = o.observed.map((obs, b) => {
    const lo = o.edges[b];
    const hi = o.edges[b + 1];
    const w = hi - lo;
    return {
      lo,
      hi,
      l: lo + 0.12 * w,
      r: hi - 0.12 * w,
      mid: (lo + hi) / 2,
      observed: obs,
      q05: o.q05[b],
      q25: o.q25[b],
      q50: o.q50[b],
      q75: o.q75[b],
      q95: o.q95[b],
      outside: obs < o.q05[b] || obs > o.q95[b],
    };
  });
  const m = o.sample.length;
  const dots = o.sample.flatMap((shares, j) =>
    shares.map((share, b) => ({ x: bins[b].l + ((j + 0.5) / m) * (bins[b].r - bins[b].l), share })),
  );
  return { bins, dots };
}

/** The data's shares per bin against the replicated data sets' (see the file comment). */
export function overlaySpec(o: Overlay, valueTitle: string, width = 420, height = 220): Spec {
  const { bins, dots } = overlayRows(o);
  const x = { type: 'quantitative', title: valueTitle, scale: { zero: false, nice: false, domain: [o.edges[0], o.edges[o.edges.length - 1]] } };
  const y = { type: 'quantitative', title: 'share of rows in the bin', axis: { format: '.0%' } };
  return {
    ...base(width, height),
    layer: [
      {
        data: { values: bins },
        mark: { type: 'rect', color: PALETTE.accent, opacity: 0.16 },
        encoding: { x: { field: 'l', ...x }, x2: { field: 'r' }, y: { field: 'q05', ...y }, y2: { field: 'q95' } },
      },
      {
        data: { values: bins },
        mark: { type: 'rect', color: PALETTE.accent, opacity: 0.38 },
        encoding: { x: { field: 'l', ...x }, x2: { field: 'r' }, y: { field: 'q25', ...y }, y2: { field: 'q75' } },
      },
      {
        data: { values: bins },
        mark: { type: 'rule', color: PALETTE.accent, strokeWidth: 1.5 },
        encoding: { x: { field: 'l', ...x }, x2: { field: 'r' }, y: { field: 'q50', ...y } },
      },
      {
        data: { values: dots },
        mark: { type: 'circle', size: 7, color: PALETTE.inkSoft, opacity: 0.45 },
        encoding: { x: { field: 'x', ...x }, y: { field: 'share', ...y } },
      },
      {
        data: { values: bins },
        mark: { type: 'rule', color: PALETTE.ink, strokeWidth: 2.5 },
        encoding: { x: { field: 'l', ...x }, x2: { field: 'r' }, y: { field: 'observed', ...y } },
      },
      {
        data: { values: bins },
        mark: { type: 'circle', size: 46, opacity: 1, stroke: PALETTE.paper, strokeWidth: 1 },
        encoding: {
          x: { field: 'mid', ...x },
          y: { field: 'observed', ...y },
          color: { field: 'outside', type: 'nominal', scale: { domain: [false, true], range: [PALETTE.ink, PALETTE.warning] }, legend: null },
          tooltip: [
            { field: 'lo', title: 'from', format: '.4~g' },
            { field: 'hi', title: 'to', format: '.4~g' },
            { field: 'observed', title: 'data', format: '.1%' },
            { field: 'q05', title: 'replicated 5%', format: '.1%' },
            { field: 'q95', title: 'replicated 95%', format: '.1%' },
          ],
        },
      },
    ],
  };
}

export interface GroupRow {
  group: string;
  observed: number | null;
  lo: number | null;
  hi: number | null;
  p: number;
  extreme: boolean;
}

/** One statistic per group: the replicated 5–95 % range as a bar, the data's value as a diamond. */
export function groupSpec(rows: GroupRow[], statTitle: string, width = 420): Spec {
  const data = rows.filter((r) => r.observed !== null && r.lo !== null && r.hi !== null);
  const height = Math.max(60, 26 * data.length);
  const y = { field: 'group', type: 'nominal', title: null, sort: null, axis: { labelFont: FONT_UI, labelFontSize: 11 } };
  return {
    ...base(width, height),
    data: { values: data },
    layer: [
      {
        mark: { type: 'bar', color: PALETTE.accent, opacity: 0.3, height: 10, cornerRadius: 2 },
        encoding: { y, x: { field: 'lo', type: 'quantitative', title: statTitle, scale: { zero: false } }, x2: { field: 'hi' } },
      },
      {
        mark: { type: 'point', shape: 'diamond', filled: true, size: 90, opacity: 1 },
        encoding: {
          y,
          x: { field: 'observed', type: 'quantitative' },
          color: { field: 'extreme', type: 'nominal', scale: { domain: [false, true], range: [PALETTE.ink, PALETTE.warning] }, legend: null },
          tooltip: [
            { field: 'group', title: 'group' },
            { field: 'observed', title: 'data', format: '.4~g' },
            { field: 'lo', title: 'replicated 5%', format: '.4~g' },
            { field: 'hi', title: 'replicated 95%', format: '.4~g' },
            { field: 'p', title: 'p', format: '.3f' },
          ],
        },
      },
    ],
  };
}

/** Pareto k per row with the threshold drawn across; rows above it in the warning colour. */
export function paretoKSpec(loo: Pick<LooSummary, 'k' | 'kThreshold'>, width = 420, height = 150): Spec {
  const rows = (loo.k ?? []).map((k, i) => ({ row: i + 1, k: k ?? 2, infinite: k === null, high: k === null || k > loo.kThreshold }));
  return {
    ...base(width, height),
    layer: [
      {
        data: { values: rows },
        mark: { type: 'point', filled: true, size: 22 },
        encoding: {
          x: { field: 'row', type: 'quantitative', title: 'data row', scale: { zero: false } },
          y: { field: 'k', type: 'quantitative', title: 'Pareto k' },
          color: { field: 'high', type: 'nominal', scale: { domain: [false, true], range: [PALETTE.inkSoft, PALETTE.warning] }, legend: null },
          tooltip: [
            { field: 'row', title: 'row' },
            { field: 'k', title: 'k', format: '.2f' },
          ],
        },
      },
      {
        data: { values: [{ t: loo.kThreshold }] },
        mark: { type: 'rule', color: PALETTE.warning, strokeDash: [4, 3] },
        encoding: { y: { field: 't', type: 'quantitative' } },
      },
    ],
  };
}

/** Which way an extreme p-value points, in words (p = share of replicates above the data). */
export function pReading(c: Pick<StatCheckSummary, 'p'>, low: number, high: number): 'data-higher' | 'data-lower' | 'within' {
  if (c.p < low) return 'data-higher';
  if (c.p > high) return 'data-lower';
  return 'within';
}
