/**
 * Vega-Lite specifications for the fit cell's plots, built from plain arrays so they can be
 * tested without a browser. Rendering happens in components/plot-frame.tsx through react-vega.
 */
import type { Box, Point, Segment } from './region';
import { CHAIN_COLOURS, FONT_MONO, FONT_UI, PALETTE } from './palette';

export type Spec = Record<string, unknown>;

const base = (width: number, height: number): Spec => ({
  $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
  width,
  height,
  background: 'transparent',
  config: {
    font: FONT_UI,
    view: { stroke: null },
    axis: {
      labelFont: FONT_MONO,
      labelFontSize: 10,
      labelColor: PALETTE.inkSoft,
      titleFont: FONT_UI,
      titleFontWeight: 500,
      titleColor: PALETTE.ink,
      gridColor: PALETTE.rule,
      gridOpacity: 0.6,
      domainColor: PALETTE.rule,
      tickColor: PALETTE.rule,
    },
    legend: { labelFont: FONT_UI, titleFont: FONT_UI, orient: 'top', direction: 'horizontal' },
  },
});

const chainScale = (chains: number) => ({
  domain: Array.from({ length: chains }, (_, k) => k + 1),
  range: CHAIN_COLOURS.slice(0, Math.max(1, Math.min(chains, CHAIN_COLOURS.length))),
});

/** Trace: draw value against iteration, one line per chain. */
export function traceSpec(name: string, rows: { chain: number; iter: number; value: number }[], chains: number, width = 520, height = 180): Spec {
  return {
    ...base(width, height),
    data: { values: rows },
    mark: { type: 'line', strokeWidth: 0.8, opacity: 0.85 },
    encoding: {
      x: { field: 'iter', type: 'quantitative', title: 'iteration' },
      y: { field: 'value', type: 'quantitative', title: name, scale: { zero: false } },
      color: { field: 'chain', type: 'nominal', title: 'chain', scale: chainScale(chains) },
    },
  };
}

/** Density: a kernel density per chain (thin lines) and pooled (thicker, ink). */
export function densitySpec(name: string, rows: { chain: number; value: number }[], chains: number, width = 520, height = 180): Spec {
  return {
    ...base(width, height),
    data: { values: rows },
    layer: [
      {
        transform: [{ density: 'value', groupby: ['chain'], steps: 120 }],
        mark: { type: 'line', strokeWidth: 1, opacity: 0.7 },
        encoding: {
          x: { field: 'value', type: 'quantitative', title: name, scale: { zero: false } },
          y: { field: 'density', type: 'quantitative', title: 'density' },
          color: { field: 'chain', type: 'nominal', title: 'chain', scale: chainScale(chains) },
        },
      },
      {
        transform: [{ density: 'value', steps: 160 }],
        mark: { type: 'line', strokeWidth: 2, color: PALETTE.ink },
        encoding: {
          x: { field: 'value', type: 'quantitative' },
          y: { field: 'density', type: 'quantitative' },
        },
      },
    ],
  };
}

/** Rank plot: histogram of pooled ranks per chain with the flat line expected under good mixing. */
export function rankSpec(name: string, rows: { chain: number; bin: number; count: number }[], chains: number, expected: number, width = 520, height = 180): Spec {
  return {
    ...base(width, height),
    title: { text: `ranks of ${name}`, font: FONT_UI, fontSize: 12, fontWeight: 500, color: PALETTE.ink, anchor: 'start' },
    layer: [
      {
        data: { values: rows },
        mark: { type: 'line', interpolate: 'step', strokeWidth: 1.2 },
        encoding: {
          x: { field: 'bin', type: 'quantitative', title: 'rank bin', scale: { zero: false } },
          y: { field: 'count', type: 'quantitative', title: 'draws' },
          color: { field: 'chain', type: 'nominal', title: 'chain', scale: chainScale(chains) },
        },
      },
      {
        data: { values: [{ expected }] },
        mark: { type: 'rule', strokeDash: [4, 3], color: PALETTE.inkSoft },
        encoding: { y: { field: 'expected', type: 'quantitative' } },
      },
    ],
  };
}

/** Pair scatter of two quantities; divergent transitions are drawn in the warning colour. */
export function pairSpec(
  xName: string,
  yName: string,
  rows: { x: number; y: number; chain: number; divergent: number }[],
  chains: number,
  width = 360,
  height = 320,
): Spec {
  return {
    ...base(width, height),
    data: { values: rows },
    layer: [
      {
        transform: [{ filter: 'datum.divergent == 0' }],
        mark: { type: 'circle', size: 9, opacity: 0.45 },
        encoding: {
          x: { field: 'x', type: 'quantitative', title: xName, scale: { zero: false } },
          y: { field: 'y', type: 'quantitative', title: yName, scale: { zero: false } },
          color: { field: 'chain', type: 'nominal', title: 'chain', scale: chainScale(chains) },
        },
      },
      {
        transform: [{ filter: 'datum.divergent == 1' }],
        mark: { type: 'point', shape: 'cross', size: 30, color: PALETTE.warning, opacity: 0.9 },
        encoding: {
          x: { field: 'x', type: 'quantitative' },
          y: { field: 'y', type: 'quantitative' },
        },
      },
    ],
  };
}

