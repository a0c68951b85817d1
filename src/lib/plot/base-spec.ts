/** The frame every vega-lite figure of the notebook starts from: size, fonts, axis colours from the palette. */
import { FONT_MONO, FONT_UI, PALETTE } from './palette';
import type { Spec } from '@/features/notebook/components/plot-frame';

export const baseSpec = (width: number, height: number, extraConfig: Record<string, unknown> = {}): Spec => ({
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
    ...extraConfig,
  },
});
