/** Hover text for built-in functions and statement keywords: signature, one-line doc, example. */
import type { EditorState } from '@codemirror/state';
import { hoverTooltip } from '@codemirror/view';
import { FUNCTIONS, LANGUAGE_KEYWORDS } from '@shared/lang';

const KEYWORDS = new Map(LANGUAGE_KEYWORDS.map((k) => [k.name, k]));

export interface HoverInfo {
  from: number;
  to: number;
  /** Signature of a function, or the keyword with an ellipsis. */
  title: string;
  /** One-line doc and example. */
  body: string;
}

/** What the hover shows at a document position, or null when the word there is not built in. */
export function hoverInfo(state: EditorState, pos: number): HoverInfo | null {
  const line = state.doc.lineAt(pos);
  const text = line.text;
  const hash = text.indexOf('#');
  if (hash >= 0 && pos - line.from > hash) return null;
  let start = pos - line.from;
  let end = start;
  while (start > 0 && /[A-Za-z0-9_]/.test(text[start - 1])) start--;
  while (end < text.length && /[A-Za-z0-9_]/.test(text[end])) end++;
  if (start === end) return null;
  const word = text.slice(start, end);
  const fn = FUNCTIONS.get(word);
  if (fn) return { from: line.from + start, to: line.from + end, title: fn.signature, body: `${fn.doc} Example: ${fn.example}` };
  const kw = KEYWORDS.get(word);
  if (kw) return { from: line.from + start, to: line.from + end, title: `${kw.name} …`, body: `${kw.doc} Example: ${kw.example}` };
  return null;
}

export const modelHover = hoverTooltip((view, pos) => {
  const info = hoverInfo(view.state, pos);
  if (!info) return null;
  return {
    pos: info.from,
    end: info.to,
    above: true,
    create: () => {
      const dom = document.createElement('div');
      dom.className = 'sl-hover';
      const head = document.createElement('div');
      head.className = 'sl-hover-signature';
      head.textContent = info.title;
      const body = document.createElement('div');
      body.className = 'sl-hover-doc';
      body.textContent = info.body;
      dom.append(head, body);
      return { dom };
    },
  };
});
