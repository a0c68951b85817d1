// @vitest-environment happy-dom
/**
 * Backtick spans in messages are shown as inline code wherever messages are shown: the shared
 * splitter (the backtick rule of common markdown practice: a span closes at a run of as many
 * backticks as opened it, an unmatched backtick is literal), the React component, the model side
 * panel (problems and region message) and the editor's lint tooltips.
 */
import { EditorView } from '@codemirror/view';
import { cleanup, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import { MessageText, messageElement, messageParts } from '@/components/message-text';
import { messagesToDiagnostics } from '@/features/model-editor';
import { ModelSidePanel } from '@/features/notebook/model/model-side-panel';

afterEach(cleanup);

describe('messageParts', () => {
  it('splits a message at its backtick spans', () => {
    expect(messageParts('`sigma` is used before it is declared')).toEqual([
      { text: 'sigma', code: true },
      { text: ' is used before it is declared', code: false },
    ]);
    expect(messageParts('unknown name `sigam`; did you mean `sigma`?')).toEqual([
      { text: 'unknown name ', code: false },
      { text: 'sigam', code: true },
      { text: '; did you mean ', code: false },
      { text: 'sigma', code: true },
      { text: '?', code: false },
    ]);
  });

  it('keeps an unmatched backtick as text and reads double-backtick spans holding one', () => {
    expect(messageParts('a ` alone')).toEqual([{ text: 'a ` alone', code: false }]);
    expect(messageParts('`` `)` `` is missing')).toEqual([
      { text: '`)`', code: true },
      { text: ' is missing', code: false },
    ]);
    expect(messageParts('no code here')).toEqual([{ text: 'no code here', code: false }]);
  });
});

describe('MessageText and messageElement', () => {
  it('render code spans as <code> with no backticks left', () => {
    const { container } = render(
      <p>
        <MessageText text="`mu` has 6 elements and `level` has 3" />
      </p>,
    );
    expect([...container.querySelectorAll('code')].map((c) => c.textContent)).toEqual(['mu', 'level']);
    expect(container.textContent).toBe('mu has 6 elements and level has 3');
    const el = messageElement('table `harvest` is not bound');
    expect(el.querySelector('code')?.textContent).toBe('harvest');
    expect(el.textContent).toBe('table harvest is not bound');
  });
});

describe('where messages are shown', () => {
  it('the model side panel shows problems and the region message with inline code', () => {
    render(
      <ModelSidePanel
        checking={false}
        check={{
          ok: false,
          unknowns: [{ name: 'mu', shape: [] }],
          derived: [],
          tables: [],
          constraints: { inequalities: 1, equalities: 0 },
          messages: [{ severity: 'error', line: 3, column: 5, message: 'unknown name `sigam`; did you mean `sigma`?' }],
          region: { status: 'unchecked', message: 'The region could not be checked: `exp(a)` is not affine in the unknowns' },
        }}
      />,
    );
    const panel = screen.getByTestId('model-side-panel');
    expect(panel.textContent).not.toContain('`');
    expect([...panel.querySelectorAll('code')].map((c) => c.textContent)).toEqual(['exp(a)', 'sigam', 'sigma']);
  });

  it('lint tooltips render the message through the same helper', () => {
    const view = new EditorView({ doc: 'unknown mu\nterm ld_normal(mu, 0, sigam)' });
    const [d] = messagesToDiagnostics(view, [
      { line: 2, column: 23, endColumn: 28, severity: 'error', message: 'unknown name `sigam`', suggestion: 'did you mean `mu`?' },
    ]);
    expect(d.message).toBe('unknown name `sigam`; did you mean `mu`?');
    const node = d.renderMessage!(view) as HTMLElement;
    expect([...node.querySelectorAll('code')].map((c) => c.textContent)).toEqual(['sigam', 'mu']);
    expect(node.textContent).toBe('unknown name sigam; did you mean mu?');
    view.destroy();
  });
});
