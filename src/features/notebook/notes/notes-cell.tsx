import { Markdown } from '@/components/markdown';
import { compactControlClass } from '@/components/ui/input';

/** Notes through the one markdown renderer (raw HTML shown as text; see components/markdown). */
export function NotesView({ text }: { text: string }) {
  if (!text.trim()) return <p className="truncate text-[0.8rem] text-ink-soft italic">Empty notes.</p>;
  return <Markdown source={text} className="prose-slackline text-[0.95rem] leading-[1.6]" testId="notes-view" />;
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
          className={compactControlClass}
          style={{ minHeight: '9rem', fontSize: '0.85rem', resize: 'vertical' }}
          aria-label="Notes text (markdown)"
          value={text}
          autoFocus
          onChange={(e) => onChange(e.target.value)}
          onKeyDown={(e) => {
            if (e.key === 'Escape') onEditingChange(false);
          }}
        />
        <div className="border-l pl-3" style={{ borderColor: 'var(--color-rule)' }}>
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
