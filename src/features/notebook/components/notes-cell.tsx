import { useMemo } from 'react';
import { marked } from 'marked';
import DOMPurify from 'dompurify';

/** Markdown to sanitised HTML: marked renders, DOMPurify removes scripts, handlers and unsafe URLs. */
export function renderMarkdown(text: string): string {
  const html = marked.parse(text, { async: false, gfm: true, breaks: false }) as string;
  return DOMPurify.sanitize(html, { USE_PROFILES: { html: true } });
}

export function NotesView({ text }: { text: string }) {
  const html = useMemo(() => renderMarkdown(text), [text]);
  if (!text.trim()) return <p className="sl-cell-sub italic">Empty notes.</p>;
  return <div className="sl-prose" data-testid="notes-view" dangerouslySetInnerHTML={{ __html: html }} />;
}

export interface NotesCellProps {
  text: string;
  editing: boolean;
  readOnly: boolean;
  onChange: (text: string) => void;
  onEditingChange: (editing: boolean) => void;
}

/** A notes cell: rendered markdown; editors switch to the text with a double click or the Edit button. */
export function NotesCell({ text, editing, readOnly, onChange, onEditingChange }: NotesCellProps) {
  if (editing && !readOnly) {
    return (
      <div className="grid gap-3 md:grid-cols-2">
        <textarea
          className="sl-input"
          style={{ minHeight: '9rem', fontSize: '0.85rem', resize: 'vertical' }}
          aria-label="Notes text (markdown)"
          value={text}
          autoFocus
          onChange={(e) => onChange(e.target.value)}
          onKeyDown={(e) => {
            if (e.key === 'Escape') onEditingChange(false);
          }}
        />
        <div className="border-l pl-3" style={{ borderColor: 'var(--sl-rule)' }}>
          <NotesView text={text} />
        </div>
      </div>
    );
  }
  return (
    <div onDoubleClick={() => !readOnly && onEditingChange(true)}>
      <NotesView text={text} />
    </div>
  );
}
