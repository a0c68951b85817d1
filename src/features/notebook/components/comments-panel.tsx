import { useState, type FormEvent } from 'react';
import type { Comment } from '@shared/api/notebook';
import { formatDateTime } from '@/lib/format';
import { buttonClass } from '@/components/ui/button';
import { compactControlClass } from '@/components/ui/input';

export interface CommentThread {
  root: Comment;
  replies: Comment[];
}

/** Group comments into threads: a root and its replies in time order, newest thread last. */
export function threadComments(comments: readonly Comment[]): CommentThread[] {
  const byId = new Map(comments.map((c) => [c.id, c]));
  const rootOf = (c: Comment): Comment => {
    let cur = c;
    const seen = new Set<string>();
    while (cur.replyTo && byId.has(cur.replyTo) && !seen.has(cur.id)) {
      seen.add(cur.id);
      cur = byId.get(cur.replyTo)!;
    }
    return cur;
  };
  const threads = new Map<string, CommentThread>();
  const sorted = [...comments].sort((a, b) => a.createdAt.localeCompare(b.createdAt) || a.id.localeCompare(b.id));
  for (const c of sorted) {
    const root = rootOf(c);
    if (!threads.has(root.id)) threads.set(root.id, { root, replies: [] });
    if (root.id !== c.id) threads.get(root.id)!.replies.push(c);
  }
  return [...threads.values()];
}

export interface CommentsPanelProps {
  comments: Comment[];
  canComment: boolean;
  busy?: boolean;
  error?: string | null;
  onCreate: (body: string, replyTo: string | null) => void;
  onResolve: (commentId: string, resolved: boolean) => void;
}

/** Comments on one cell: threads with replies, resolve and reopen. */
export function CommentsPanel({ comments, canComment, busy, error, onCreate, onResolve }: CommentsPanelProps) {
  const threads = threadComments(comments);
  const [showResolved, setShowResolved] = useState(false);
  const open = threads.filter((t) => !t.root.resolved);
  const resolved = threads.filter((t) => t.root.resolved);
  const shown = showResolved ? threads : open;
  return (
    <div className="flex flex-col gap-3 text-sm" data-testid="comments-panel">
      <div className="flex items-center gap-2">
        <span className="text-[0.7rem] font-semibold tracking-[0.14em] text-ink-soft uppercase group-data-[active=true]/cell:text-slack">Comments</span>
        <span className="truncate text-[0.8rem] text-ink-soft">
          {open.length} open · {resolved.length} resolved
        </span>
        {resolved.length > 0 && (
          <button type="button" className={buttonClass('quiet', 'xs')} onClick={() => setShowResolved((v) => !v)}>
            {showResolved ? 'hide resolved' : 'show resolved'}
          </button>
        )}
      </div>
      {shown.map((t) => (
        <Thread key={t.root.id} thread={t} canComment={canComment} busy={busy} onCreate={onCreate} onResolve={onResolve} />
      ))}
      {error && <p className="mt-[0.2rem] text-[0.75rem] font-semibold text-ink" role="alert">{error}</p>}
      {canComment ? (
        <CommentForm placeholder="Comment on this cell…" busy={busy} onSubmit={(b) => onCreate(b, null)} />
      ) : (
        <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft" data-testid="comments-read-only">
          {threads.length === 0 ? 'No comments on this cell. ' : ''}Your role lets you read the comments; reviewers, editors and owners write them.
        </p>
      )}
    </div>
  );
}

function Thread({ thread, canComment, busy, onCreate, onResolve }: { thread: CommentThread; canComment: boolean; busy?: boolean; onCreate: CommentsPanelProps['onCreate']; onResolve: CommentsPanelProps['onResolve'] }) {
  const [replying, setReplying] = useState(false);
  const { root, replies } = thread;
  return (
    <article className="group/cell relative rounded-[3px] border border-rule bg-sheet shadow-[0_1px_0_rgba(34,40,43,0.04)] transition-[box-shadow,border-color] duration-[120ms] data-[active=true]:border-rule-strong data-[active=true]:shadow-[0_6px_18px_-12px_rgba(34,40,43,0.35)] focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-slack" style={{ padding: '0.6rem 0.75rem', opacity: root.resolved ? 0.7 : 1 }} data-testid="comment-thread">
      {[root, ...replies].map((c) => (
        <div key={c.id} style={{ marginLeft: c === root ? 0 : '1rem', marginTop: c === root ? 0 : '0.4rem' }}>
          <div className="truncate text-[0.8rem] text-ink-soft">
            <strong style={{ color: 'var(--color-ink)' }}>{c.author?.name ?? 'former member'}</strong> · <span className="font-mono tabular-nums text-right whitespace-nowrap">{formatDateTime(c.createdAt)}</span>
          </div>
          <p style={{ whiteSpace: 'pre-wrap' }}>{c.body}</p>
        </div>
      ))}
      {canComment && (
        <div className="flex gap-1" style={{ marginTop: '0.3rem' }}>
          <button type="button" className={buttonClass('quiet', 'xs')} onClick={() => setReplying((v) => !v)}>
            reply
          </button>
          <button type="button" className={buttonClass('quiet', 'xs')} disabled={busy} onClick={() => onResolve(root.id, !root.resolved)}>
            {root.resolved ? 'reopen' : 'resolve'}
          </button>
        </div>
      )}
      {replying && (
        <CommentForm
          placeholder="Reply…"
          busy={busy}
          onSubmit={(b) => {
            onCreate(b, root.id);
            setReplying(false);
          }}
        />
      )}
    </article>
  );
}

function CommentForm({ placeholder, busy, onSubmit }: { placeholder: string; busy?: boolean; onSubmit: (body: string) => void }) {
  const [text, setText] = useState('');
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const body = text.trim();
    if (!body) return;
    onSubmit(body);
    setText('');
  };
  return (
    <form onSubmit={submit} className="flex flex-col gap-1">
      <textarea className={compactControlClass} style={{ fontFamily: 'inherit', minHeight: '3.5rem' }} aria-label={placeholder} placeholder={placeholder} value={text} maxLength={4000} onChange={(e) => setText(e.target.value)} />
      <div>
        <button type="submit" className={buttonClass('secondary', 'xs')} disabled={busy || !text.trim()}>
          Post
        </button>
      </div>
    </form>
  );
}
