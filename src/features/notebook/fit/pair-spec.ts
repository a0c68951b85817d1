/**
 * Vega-Lite specifications for the fit cell's plots, built from plain arrays so they can be
 * tested without a browser. Rendering happens in components/plot-frame.tsx through react-vega.
 */
import type { Box, Point, Segment } from './region';
import { CHAIN_COLOURS, FONT_MONO, FONT_UI, PALETTE } from '@/lib/plot/palette';
import type { Spec } from '../components/plot-frame';
import { baseSpec } from '@/lib/plot/base-spec';

const base = (width: number, height: number): Spec =>
  baseSpec(width, height, { legend: { labelFont: FONT_UI, titleFont: FONT_UI, orient: 'top', direction: 'horizontal' } });

const chainScale = (chains: number) => ({
  domain: Array.from({ length: chains }, (_, k) => k + 1),
  range: CHAIN_COLOURS.slice(0, Math.max(1, Math.min(chains, CHAIN_COLOURS.length))),
});

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

