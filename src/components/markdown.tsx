import { useMemo } from 'react';
import { Marked, type Tokens } from 'marked';
import DOMPurify from 'dompurify';

/**
 * The one markdown renderer (notes cells, in the notebook and in the share view).
 *
 * Notes are plain markdown: raw HTML in them is shown as text, never parsed, so a note cannot
 * bring its own <style>, <form>, positioned <div> or class and style attributes that would let
 * it cover the page or imitate the app (a fake sign-in box on a shared notebook). Links and images
 * may only use http(s), mailto or same-site addresses. DOMPurify then keeps only the small list of
 * elements and attributes markdown itself produces, as a second line of defence.
 */

const ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };
export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ESCAPES[c]);
}

/** True for http(s), mailto, and relative or fragment addresses; false for javascript:, data:, etc. */
export function isSafeUrl(href: string): boolean {
  const trimmed = href.trim();
  // a scheme is letters/digits/+.- before the first ':' that comes before any '/', '?' or '#'
  const scheme = /^([a-z][a-z0-9+.-]*):/i.exec(trimmed.replace(/[\u0000-\u0020]/g, ''));
  if (!scheme) return true;
  return ['http', 'https', 'mailto'].includes(scheme[1].toLowerCase());
}

/** Elements markdown produces; nothing that styles, positions, embeds or submits. */
export const MARKDOWN_TAGS = [
  'p', 'br', 'hr', 'h1', 'h2', 'h3', 'h4', 'h5', 'h6', 'strong', 'em', 'del', 'code', 'pre', 'blockquote',
  'ul', 'ol', 'li', 'a', 'img', 'table', 'thead', 'tbody', 'tr', 'th', 'td',
];
/** Attributes markdown produces; no class, id, style or event handler. */
export const MARKDOWN_ATTRS = ['href', 'title', 'src', 'alt', 'align', 'start'];

const md = new Marked({
  gfm: true,
  async: false,
  renderer: {
    html(token: Tokens.HTML | Tokens.Tag) {
      return escapeHtml(token.text);
    },
    link(token: Tokens.Link) {
      if (isSafeUrl(token.href)) return false; // marked's own rendering
      return this.parser.parseInline(token.tokens);
    },
    image(token: Tokens.Image) {
      if (isSafeUrl(token.href)) return false;
      return escapeHtml(token.text);
    },
    checkbox({ checked }: Tokens.Checkbox) {
      // task lists: a mark instead of a form control
      return checked ? '☑ ' : '☐ ';
    },
  },
});

export function renderMarkdown(source: string): string {
  const html = md.parse(source, { async: false });
  return DOMPurify.sanitize(html, {
    ALLOWED_TAGS: MARKDOWN_TAGS,
    ALLOWED_ATTR: MARKDOWN_ATTRS,
    ALLOW_DATA_ATTR: false,
    ALLOW_ARIA_ATTR: false,
    ALLOWED_URI_REGEXP: /^(?:https?:|mailto:|[^a-z]|[a-z+.-]+(?:[^a-z+.\-:]|$))/i,
  });
}

export function Markdown({ source, className = 'prose-slackline text-[0.9375rem] leading-relaxed text-ink', testId }: { source: string; className?: string; testId?: string }) {
  const html = useMemo(() => renderMarkdown(source), [source]);
  return (
    <div
      className={className}
      data-testid={testId}
      // raw HTML is escaped, unsafe URLs dropped and the rest kept to MARKDOWN_TAGS/ATTRS in renderMarkdown
      dangerouslySetInnerHTML={{ __html: html }}
    />
  );
}
