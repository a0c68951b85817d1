/** Hover text for built-in functions and statement keywords: signature, one-line doc, example. */
import { hoverTooltip } from '@codemirror/view';
import { FUNCTIONS, LANGUAGE_KEYWORDS } from '@shared/lang';

const KEYWORDS = new Map(LANGUAGE_KEYWORDS.map((k) => [k.name, k]));

export const modelHover = hoverTooltip((view, pos) => {
  const line = view.state.doc.lineAt(pos);
  const text = line.text;
  let start = pos - line.from;
  let end = start;
  while (start > 0 && /[A-Za-z0-9_]/.test(text[start - 1])) start--;
  while (end < text.length && /[A-Za-z0-9_]/.test(text[end])) end++;
  if (start === end) return null;
  const word = text.slice(start, end);
  const fn = FUNCTIONS.get(word);
  const kw = KEYWORDS.get(word);
  if (!fn && !kw) return null;
  return {
    pos: line.from + start,
    end: line.from + end,
    above: true,
    create: () => {
      const dom = document.createElement('div');
      dom.className = 'sl-hover';
      const head = document.createElement('div');
      head.className = 'sl-hover-signature';
      head.textContent = fn ? fn.signature : `${kw!.name} …`;
      const doc = document.createElement('div');
      doc.className = 'sl-hover-doc';
      doc.textContent = fn ? `${fn.doc} Example: ${fn.example}` : `${kw!.doc} Example: ${kw!.example}`;
      dom.append(head, doc);
      return { dom };
    },
  };
});
