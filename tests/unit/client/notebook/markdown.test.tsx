// @vitest-environment jsdom
// DOMPurify does not support happy-dom (its maintainers say sanitising there is unsafe), so the
// notes renderer is tested in jsdom, which DOMPurify supports.
import { afterEach, describe, expect, it } from 'vitest';
import { cleanup, render, screen } from '@testing-library/react';
import { NotesView, renderMarkdown } from '../../../../src/features/notebook/components/notes-cell';

afterEach(cleanup);

describe('notes markdown', () => {
  it('renders headings, emphasis, code and lists', () => {
    render(<NotesView text={'# Orchard\n\nSome *emphasis* and `code`.\n\n- one\n- two'} />);
    const view = screen.getByTestId('notes-view');
    expect(view.querySelector('h1')?.textContent).toBe('Orchard');
    expect(view.querySelector('em')?.textContent).toBe('emphasis');
    expect(view.querySelector('code')?.textContent).toBe('code');
    expect(view.querySelectorAll('li')).toHaveLength(2);
  });

  it('strips scripts, event handlers and javascript: links', () => {
    const html = renderMarkdown('<script>alert(1)</script>\n\n<img src=x onerror="alert(2)"> [x](javascript:alert(3))');
    expect(html).not.toMatch(/<script/i);
    expect(html).not.toMatch(/onerror/i);
    expect(html).not.toMatch(/javascript:/i);
    expect(html).toMatch(/<img src="x">/);
  });

  it('says so when the notes are empty', () => {
    render(<NotesView text={'   '} />);
    expect(screen.getByText('Empty notes.')).toBeTruthy();
  });
});
