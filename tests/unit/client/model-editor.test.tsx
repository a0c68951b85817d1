// @vitest-environment happy-dom
/**
 * The model editor in a simulated DOM: highlighting classes on keywords, densities, numbers and
 * comments; completion offers declared unknowns, bound columns and functions with signatures;
 * live diagnostics from the shared checker mark an unknown name and offer the suggested fix;
 * edits reach onChange, Mod-Enter reaches onRun, readOnly blocks edits.
 */
import { CompletionContext, currentCompletions, startCompletion, type CompletionResult } from '@codemirror/autocomplete';
import { diagnosticCount, forEachDiagnostic, forceLinting, type Diagnostic } from '@codemirror/lint';
import { EditorState } from '@codemirror/state';
import { EditorView, runScopeHandlers } from '@codemirror/view';
import { act, cleanup, render, waitFor } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { hoverInfo, ModelEditor, modelCompletionSource, schemaFacet, suggestedFix, suggestedName } from '@/features/model-editor';
import type { DataSchema } from '@shared/lang';

const SCHEMA: DataSchema = {
  orchard: {
    rows: 24,
    columns: {
      yield_kg: { type: 'numeric' },
      block: { type: 'category', levels: 4 },
      water_mm: { type: 'numeric' },
    },
  },
};

const SOURCE = [
  'table orchard',
  'unknown mu[4], sigma',
  'term ld_normal(yield_kg, mu[block], sigma)   # one mean per block',
  'term ld_halfnormal(sigma, 2.5) + sum(square(mu)) * -0.01',
  'constrain mu[1] <= mu[2]',
].join('\n');

afterEach(() => cleanup());

function mount(props: Partial<Parameters<typeof ModelEditor>[0]> = {}) {
  let view: EditorView | null = null;
  const utils = render(<ModelEditor value={SOURCE} schema={SCHEMA} lintDelay={10} onView={(v) => (view = v)} {...props} />);
  if (!view) throw new Error('editor view was not created');
  return { ...utils, view: view as EditorView };
}

function texts(container: HTMLElement, cls: string): string[] {
  return [...container.querySelectorAll(`.${cls}`)].map((e) => e.textContent ?? '');
}

describe('ModelEditor highlighting', () => {
  it('marks keywords, densities, math functions, numbers, comments and comparisons with our classes', async () => {
    const { container } = mount();
    await waitFor(() => expect(texts(container, 'sl-tok-keyword')).toEqual(['table', 'unknown', 'term', 'term', 'constrain']));
    expect(texts(container, 'sl-tok-density')).toEqual(['ld_normal', 'ld_halfnormal']);
    expect(texts(container, 'sl-tok-function')).toEqual(['sum', 'square']);
    expect(texts(container, 'sl-tok-number')).toEqual(expect.arrayContaining(['4', '2.5', '0.01', '1', '2']));
    expect(texts(container, 'sl-tok-comment')).toEqual(['# one mean per block']);
    expect(texts(container, 'sl-tok-comparison')).toEqual(['<=']);
    // A keyword in the middle of a line is not a statement keyword.
    expect(container.querySelector('.cm-content')?.getAttribute('aria-label')).toBe('Model');
  });

  it('marks a term line\'s role marker as a keyword (docs/language.md)', async () => {
    const { container } = mount({ value: 'unknown a\nterm ld_normal(a, 0, 1) :: prior' });
    await waitFor(() => expect(texts(container, 'sl-tok-keyword')).toEqual(['unknown', 'term', ':: prior']));
  });
});

describe('ModelEditor completion', () => {
  it('offers a declared unknown (with its shape) in the running editor', async () => {
    const value = 'table orchard\nunknown sigma, mu[4]\nterm ld_normal(yield_kg, mu[block], si';
    const { view } = mount({ value });
    act(() => {
      view.dispatch({ selection: { anchor: value.length } });
      startCompletion(view);
    });
    await waitFor(() => expect(currentCompletions(view.state).map((c) => c.label)).toContain('sigma'));
    const sigma = currentCompletions(view.state).find((c) => c.label === 'sigma');
    expect(sigma?.detail).toBe('unknown, scalar');
  });

  it('offers bound columns, functions with signatures, keywords at line start, and a table’s columns after `table.`', async () => {
    const run = async (doc: string): Promise<CompletionResult | null> => {
      const state = EditorState.create({ doc, extensions: [schemaFacet.of(SCHEMA)] });
      return await modelCompletionSource(new CompletionContext(state, doc.length, true));
    };
    const mid = await run('table orchard\nunknown mu[4]\nterm ld_normal(');
    const labels = mid!.options.map((o) => o.label);
    expect(labels).toEqual(expect.arrayContaining(['mu', 'yield_kg', 'block', 'water_mm', 'ld_normal', 'log_sum_exp']));
    expect(mid!.options.find((o) => o.label === 'ld_normal')?.detail).toBe('ld_normal(x, mu, sigma) → scalar');
    expect(mid!.options.find((o) => o.label === 'block')?.detail).toBe('orchard · category, 4 levels');

    const start = await run('table orchard\nun');
    expect(start!.options.map((o) => o.label)).toEqual(['table', 'unknown', 'const', 'let', 'term', 'constrain', 'derive', 'replicate']);
    expect(start!.from).toBe('table orchard\n'.length);

    const tableName = await run('table or');
    expect(tableName!.options.map((o) => o.label)).toEqual(['orchard']);

    const member = await run('table orchard\nunknown b\nterm ld_normal(orchard.wa');
    expect(member!.options.map((o) => o.label)).toEqual(['yield_kg', 'block', 'water_mm']);

    // Columns of a table that is not bound are not offered as bare names.
    const unbound = await run('unknown mu\nterm ld_normal(');
    expect(unbound!.options.map((o) => o.label)).not.toContain('yield_kg');
    // Nothing inside a comment.
    expect(await run('unknown mu # mu')).toBeNull();
  });
});

describe('ModelEditor diagnostics', () => {
  it('marks an unknown name with the checker’s message and offers the suggested name as a fix', async () => {
    const value = 'table orchard\nunknown mu, sigma\nterm ld_normal(yield_kg, mu, sigam)';
    const onCheck = vi.fn();
    const { view, container } = mount({ value, onCheck });
    act(() => forceLinting(view));
    await waitFor(() => expect(diagnosticCount(view.state)).toBeGreaterThan(0));
    const found: Diagnostic[] = [];
    forEachDiagnostic(view.state, (d) => found.push(d));
    const d = found.find((x) => x.message.includes('sigam'));
    expect(d, found.map((x) => x.message).join(' | ')).toBeDefined();
    expect(d!.severity).toBe('error');
    expect(view.state.sliceDoc(d!.from, d!.to)).toBe('sigam');
    expect(d!.actions?.map((a) => a.name)).toEqual(['Use sigma']);
    await waitFor(() => expect(container.querySelector('.cm-lintRange-error')).not.toBeNull());
    expect(onCheck).toHaveBeenCalled();
    expect(onCheck.mock.calls.at(-1)![0].ok).toBe(false);

    // Applying the fix clears the diagnostic.
    act(() => d!.actions![0].apply(view, d!.from, d!.to));
    expect(view.state.doc.line(3).text).toBe('term ld_normal(yield_kg, mu, sigma)');
    act(() => forceLinting(view));
    await waitFor(() => expect(diagnosticCount(view.state)).toBe(0));
  });

  it('re-checks when the schema changes (a column that disappears becomes an error)', async () => {
    const value = 'table orchard\nunknown mu\nterm ld_normal(water_mm, mu, 1)';
    const { view, rerender } = mount({ value });
    act(() => forceLinting(view));
    await waitFor(() => expect(view.state.facet(schemaFacet)).toBe(SCHEMA));
    await waitFor(() => expect(diagnosticCount(view.state)).toBe(0));
    const smaller: DataSchema = { orchard: { rows: 24, columns: { yield_kg: { type: 'numeric' } } } };
    rerender(<ModelEditor value={value} schema={smaller} lintDelay={10} />);
    act(() => forceLinting(view));
    await waitFor(() => expect(diagnosticCount(view.state)).toBeGreaterThan(0));
  });
});

describe('ModelEditor props', () => {
  it('reports edits through onChange, follows the value prop without echoing it, runs on Mod-Enter', () => {
    const onChange = vi.fn();
    const onRun = vi.fn();
    const { view, rerender } = mount({ onChange, onRun });
    act(() => view.dispatch({ changes: { from: 0, insert: '# orchard model\n' }, userEvent: 'input' }));
    expect(onChange).toHaveBeenCalledWith(`# orchard model\n${SOURCE}`);

    rerender(<ModelEditor value={'unknown a'} schema={SCHEMA} onChange={onChange} onRun={onRun} />);
    expect(view.state.doc.toString()).toBe('unknown a');
    expect(onChange).toHaveBeenCalledTimes(1);

    const mac = /Mac/.test(navigator.platform);
    const event = new KeyboardEvent('keydown', { key: 'Enter', ctrlKey: !mac, metaKey: mac, bubbles: true });
    const handled = runScopeHandlers(view, event, 'editor');
    expect(handled).toBe(true);
    expect(onRun).toHaveBeenCalledWith('unknown a');
  });

  it('readOnly blocks editing and can be switched off', () => {
    const { view, rerender } = mount({ readOnly: true });
    expect(view.state.readOnly).toBe(true);
    expect(view.contentDOM.getAttribute('contenteditable')).toBe('false');
    rerender(<ModelEditor value={SOURCE} schema={SCHEMA} readOnly={false} />);
    expect(view.state.readOnly).toBe(false);
  });
});

describe('helpers', () => {
  it('suggestedName takes the name out of the checker’s suggestion and ignores other advice', () => {
    expect(suggestedName('did you mean `sigma`?')).toBe('sigma');
    expect(suggestedName('orchard.block')).toBe('orchard.block');
    expect(suggestedName('add the line: table orchard')).toBeUndefined();
    expect(suggestedName(undefined)).toBeUndefined();
  });

  it('suggestedFix also offers the new spelling of a retired call, and nothing for other advice', () => {
    expect(suggestedFix('did you mean `sigma`?')).toBe('sigma');
    expect(suggestedFix('did you mean `ld_binomial(k, n, logistic(a + b * x))`?')).toBe('ld_binomial(k, n, logistic(a + b * x))');
    expect(suggestedFix('add the line: table orchard')).toBeUndefined();
    expect(suggestedFix('did you mean `a b`?')).toBeUndefined();
  });

  it('hover on a link-capable density explains the fused form', () => {
    const doc = 'term ld_binomial(k, n, logistic(eta))';
    const state = EditorState.create({ doc });
    const fn = hoverInfo(state, doc.indexOf('binomial'));
    expect(fn?.title).toBe('ld_binomial(k, n, p) → scalar');
    expect(fn?.body).toContain('ld_binomial(k, n, logistic(eta))');
    expect(hoverInfo(state, doc.indexOf('logistic'))?.body).toContain('fused');
  });

  it('hoverInfo gives a function’s signature and doc, a keyword’s doc, nothing inside comments', () => {
    const doc = 'term ld_beta(p, 2, 2) # ld_beta';
    const state = EditorState.create({ doc });
    const fn = hoverInfo(state, doc.indexOf('beta'));
    expect(fn?.title).toBe('ld_beta(x, a, b) → scalar');
    expect(state.sliceDoc(fn!.from, fn!.to)).toBe('ld_beta');
    expect(hoverInfo(state, 1)?.title).toBe('term …');
    expect(hoverInfo(state, doc.indexOf('p,'))).toBeNull();
    expect(hoverInfo(state, doc.lastIndexOf('beta'))).toBeNull();
  });
});
