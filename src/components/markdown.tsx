import { useMemo } from 'react';
import { Marked, type Tokens } from 'marked';

/**
 * Markdown for notes cells. Notes are plain markdown: raw HTML in them is shown as text, never
 * parsed, and links or images may only use http(s), mailto or same-site addresses. Everything else
 * marked escapes itself, so the output carries no script, handler or foreign scheme.
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
  },
});

export function renderMarkdown(source: string): string {
  return md.parse(source, { async: false });
}

export function Markdown({ source }: { source: string }) {
  const html = useMemo(() => renderMarkdown(source), [source]);
  return (
    <div
      className="prose-slackline text-[0.9375rem] leading-relaxed text-ink"
      // raw HTML is escaped and unsafe URLs dropped in renderMarkdown
      dangerouslySetInnerHTML={{ __html: html }}
    />
  );
}
