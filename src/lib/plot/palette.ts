/**
 * Slackline's colours for plots, kept in step with the CSS custom properties of the notebook.
 * One accent ("room left / feasible"), one warning colour (failed diagnostics only), ink on paper.
 */
export const PALETTE = {
  paper: '#fbf8f1',
  ink: '#22282b',
  inkSoft: '#5b6468',
  rule: '#d9d2c3',
  /** Room left / feasible. */
  accent: '#1f7a64',
  accentTint: '#1f7a6424',
  /** Failed diagnostics only. */
  warning: '#c4391d',
} as const;

/**
 * Chain colours: muted, well separated, none of them the warning colour.
 * Chosen for Slackline: slate, ochre, plum, moss, clay, steel, sand, charcoal.
 */
export const CHAIN_COLOURS = ['#4a6b8a', '#b8862b', '#7d4e74', '#6b7f3a', '#a4634a', '#3f8e9c', '#8c7a55', '#4b4b4b'] as const;

export const FONT_UI = 'IBM Plex Sans, system-ui, sans-serif';
export const FONT_MONO = 'JetBrains Mono, ui-monospace, monospace';
