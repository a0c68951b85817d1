import { useId, useRef, useState } from 'react';
import { Button } from '@/components/ui/button';

/** A read-only value with a Copy button (falls back to selecting the text when the clipboard is refused). */
export function CopyField({ label, value }: { label: string; value: string }) {
  const id = useId();
  const ref = useRef<HTMLInputElement>(null);
  const [state, setState] = useState<'idle' | 'copied' | 'select'>('idle');
  return (
    <div className="flex flex-col gap-1.5">
      <label htmlFor={id} className="text-[0.8125rem] font-medium text-ink-soft">
        {label}
      </label>
      <div className="flex gap-2">
        <input
          ref={ref}
          id={id}
          readOnly
          value={value}
          onFocus={(e) => e.currentTarget.select()}
          className="num h-10 min-w-0 flex-1 rounded-md border border-rule-strong bg-white px-3 text-[0.8125rem]"
        />
        <Button
          variant="secondary"
          onClick={async () => {
            try {
              await navigator.clipboard.writeText(value);
              setState('copied');
            } catch {
              ref.current?.select();
              setState('select');
            }
          }}
        >
          {state === 'copied' ? 'Copied' : 'Copy link'}
        </Button>
      </div>
      <p aria-live="polite" className="text-xs text-ink-faint">
        {state === 'copied' && 'The link is on your clipboard.'}
        {state === 'select' && 'Copying was refused by the browser; the link is selected — press Ctrl+C.'}
      </p>
    </div>
  );
}
