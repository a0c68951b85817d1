/**
 * Slackline's colours for plots, kept in step with the CSS custom properties of the notebook.
 * One accent ("room left / feasible"), one warning colour (failed diagnostics only), ink on paper.
 */
export const PALETTE = {
  paper: '#f6f3ea',
  ink: '#1c2631',
  inkSoft: '#46525e',
  rule: '#e3ddcd',
  /** Room left / feasible. */
  accent: '#0d7a5f',
  accentTint: '#0d7a5f24',
  /** Failed diagnostics only. */
  warning: '#c23a1e',
} as const;

/**
 * Chain colours: muted, well separated, none of them the warning colour.
 * Chosen for Slackline: slate, ochre, plum, moss, clay, steel, sand, charcoal.
 */
export const CHAIN_COLOURS = ['#4a6b8a', '#b8862b', '#7d4e74', '#6b7f3a', '#a4634a', '#3f8e9c', '#8c7a55', '#4b4b4b'] as const;

export const FONT_UI = 'IBM Plex Sans, system-ui, sans-serif';
export const FONT_MONO = 'JetBrains Mono, ui-monospace, monospace';
