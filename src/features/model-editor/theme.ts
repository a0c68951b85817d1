/**
 * The editor's look: a calm paper surface, ink-coloured text, one accent (the app's "room left"
 * colour) for statement keywords and the cursor, and the warning colour only for error markers.
 * Colours read the theme's CSS variables (src/styles/app.css) where the palette has the colour.
 */
import { EditorView } from '@codemirror/view';

const paper = 'var(--color-paper, #f6f3ea)';
const paperDeep = '#efeadf';
const ink = 'var(--color-ink, #1c2631)';
const inkSoft = 'var(--color-ink-soft, #46525e)';
const inkFaint = '#948d7e';
const accent = 'var(--color-slack, #0d7a5f)';
const accentWash = 'rgba(23, 115, 95, 0.12)';
const warn = '#b23a1e';
const mono = "'JetBrains Mono', ui-monospace, monospace";

export const modelTheme = EditorView.theme(
  {
    '&': {
      backgroundColor: paper,
      color: ink,
      fontSize: '13.5px',
      border: `1px solid ${paperDeep}`,
      borderRadius: '6px',
    },
    '&.cm-focused': { outline: 'none', borderColor: accent },
    '.cm-scroller': { fontFamily: mono, lineHeight: '1.6', fontVariantNumeric: 'tabular-nums' },
    '.cm-content': { caretColor: accent, padding: '10px 0' },
    '.cm-cursor, .cm-dropCursor': { borderLeftColor: accent, borderLeftWidth: '2px' },
    '&.cm-focused .cm-selectionBackground, .cm-selectionBackground, ::selection': { backgroundColor: accentWash },
    '.cm-activeLine': { backgroundColor: 'rgba(35, 33, 28, 0.035)' },
    '.cm-gutters': { backgroundColor: paper, color: inkFaint, border: 'none', paddingLeft: '4px' },
    '.cm-activeLineGutter': { backgroundColor: 'transparent', color: inkSoft },
    '.cm-matchingBracket': { backgroundColor: accentWash, outline: 'none' },
    // Tokens (class names from language.ts).
    '.sl-tok-keyword': { color: accent, fontWeight: '600' },
    '.sl-tok-density': { color: ink, fontWeight: '600' },
    '.sl-tok-function': { color: ink, fontStyle: 'italic' },
    '.sl-tok-number': { color: inkSoft },
    '.sl-tok-comment': { color: inkFaint, fontStyle: 'italic' },
    '.sl-tok-comparison': { color: accent },
    '.sl-tok-operator': { color: inkSoft },
    '.sl-tok-column': { color: inkSoft, textDecoration: `underline dotted ${inkFaint}` },
    '.sl-tok-name': { color: ink },
    '.sl-tok-bracket': { color: inkFaint },
    '.sl-tok-invalid': { color: warn },
    // Lint markers: the warning colour is reserved for problems.
    '.cm-lintRange-error': { backgroundImage: 'none', borderBottom: `2px solid ${warn}` },
    '.cm-lintRange-warning': { backgroundImage: 'none', borderBottom: `2px dashed ${inkSoft}` },
    '.cm-diagnostic': { fontFamily: mono, fontSize: '12.5px', padding: '4px 8px' },
    '.cm-diagnostic-error': { borderLeft: `3px solid ${warn}` },
    '.cm-diagnostic-warning': { borderLeft: `3px solid ${inkSoft}` },
    '.cm-diagnosticAction': { backgroundColor: accent, color: paper, borderRadius: '3px' },
    '.cm-tooltip': { backgroundColor: paper, border: `1px solid ${paperDeep}`, color: ink, borderRadius: '4px' },
    '.cm-tooltip-autocomplete > ul': { fontFamily: mono },
    '.cm-tooltip-autocomplete > ul > li[aria-selected]': { backgroundColor: accentWash, color: ink },
    '.cm-completionDetail': { color: inkSoft, fontStyle: 'normal', marginLeft: '1em' },
    '.cm-completionInfo': { maxWidth: '28em', whiteSpace: 'pre-line', fontSize: '12.5px' },
    '.sl-hover': { fontFamily: mono, fontSize: '12.5px', padding: '6px 10px', maxWidth: '34em' },
    '.sl-hover-signature': { fontWeight: '600' },
    '.sl-hover-doc': { color: inkSoft, marginTop: '2px' },
  },
  { dark: false },
);
