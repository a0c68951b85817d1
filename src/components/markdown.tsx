import { useMemo } from 'react';
import { marked } from 'marked';
import DOMPurify from 'dompurify';

/** Renders a notes cell's markdown; the HTML is sanitised before it reaches the page. */
export function Markdown({ source }: { source: string }) {
  const html = useMemo(() => DOMPurify.sanitize(marked.parse(source, { async: false, gfm: true })), [source]);
  return (
    <div
      className="prose-slackline text-[0.9375rem] leading-relaxed text-ink"
      // sanitised just above
      dangerouslySetInnerHTML={{ __html: html }}
    />
  );
}
