// @vitest-environment jsdom
// DOMPurify does not support happy-dom (its maintainers say sanitising there is unsafe), so the
// notes renderer is tested in jsdom, which DOMPurify supports.
import { afterEach, describe, expect, it } from 'vitest';
import { cleanup, render, screen } from '@testing-library/react';
import { NotesView } from '../../../../src/features/notebook/notes/notes-cell';
import { renderMarkdown } from '../../../../src/components/markdown';

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

  it('shows raw HTML as text: no script, handler or javascript: link gets through', () => {
    const html = renderMarkdown('<script>alert(1)</script>\n\n<img src=x onerror="alert(2)"> [x](javascript:alert(3))');
    expect(html).not.toMatch(/<script/i);
    expect(html).not.toMatch(/<img/i);
    expect(html).not.toMatch(/href="javascript:/i);
    expect(html).toContain('&lt;script&gt;');
  });

  it('keeps page-covering HTML out: style elements, forms, positioned blocks and class/style attributes', () => {
    const payloads = [
      '<style>body{display:none}</style>',
      '<div style="position:fixed;inset:0;background:#fff;z-index:99"><a href="https://evil.example/">Sign in again</a></div>',
      '<form action="https://evil.example/"><input name="password"></form>',
      '<p class="fixed inset-0">x</p>',
    ];
    for (const p of payloads) {
      render(<NotesView text={p} />);
      const view = screen.getAllByTestId('notes-view').at(-1)!;
      expect(view.querySelector('style, form, input, div, [style], [class]')).toBeNull();
      // the text of the payload is shown, as text
      expect(view.textContent).toContain(p.slice(0, 6));
    }
  });

  it('renders markdown links, images and tables with only the attributes markdown makes', () => {
    const html = renderMarkdown('[site](https://example.org "t") ![alt](/a.png)\n\n| a | b |\n|:-|-:|\n| 1 | 2 |\n\n- [x] done');
    const doc = new DOMParser().parseFromString(html, 'text/html');
    expect(doc.querySelector('a')?.getAttribute('href')).toBe('https://example.org');
    expect(doc.querySelector('img')?.getAttribute('src')).toBe('/a.png');
    expect(doc.querySelectorAll('td')).toHaveLength(2);
    expect(doc.querySelector('input')).toBeNull();
    const attrs = [...doc.querySelectorAll('*')].flatMap((el) => [...el.attributes].map((a) => a.name));
    expect(attrs.every((a) => ['href', 'title', 'src', 'alt', 'align', 'start'].includes(a))).toBe(true);
  });

  it('says so when the notes are empty', () => {
    render(<NotesView text={'   '} />);
    expect(screen.getByText('Empty notes.')).toBeTruthy();
  });
});
