// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, render, screen, within } from '@testing-library/react';
import { useState } from 'react';
import { CellColumn, isRunKey, moveKey } from '../../../../src/features/notebook/components/cell-column';
import { CellFrame } from '../../../../src/features/notebook/components/cell-frame';
import { DataPreview, sortRows } from '../../../../src/features/notebook/data/data-preview';
import { FitSettingsForm, parseFitDraft } from '../../../../src/features/notebook/fit/fit-settings-form';
import { VerdictBanner } from '../../../../src/features/notebook/fit/verdict-banner';
import { QuantityRows } from '../../../../src/features/notebook/fit/quantity-rows';
import { ChainProgress, runStateMessage } from '../../../../src/features/notebook/fit/chain-progress';
import { ConflictDialog } from '../../../../src/features/notebook/components/conflict-dialog';
import { CommentsPanel, threadComments } from '../../../../src/features/notebook/components/comments-panel';
import type { Comment, Dataset } from '../../../../shared/api/notebook';
import type { QuantitySummary, Verdict } from '../../../../shared/fit';

afterEach(cleanup);

type C = { id: string; kind: 'notes' | 'data' | 'model' | 'fit' | 'compare' };
const CELLS: C[] = [
  { id: 'a1', kind: 'notes' },
  { id: 'b2', kind: 'data' },
  { id: 'c3', kind: 'model' },
  { id: 'd4', kind: 'fit' },
];

function Column({ onRun, onAdd }: { onRun: (id: string) => void; onAdd?: (k: string, p: number) => void }) {
  const [active, setActive] = useState<string | null>('a1');
  return (
    <CellColumn
      cells={CELLS}
      activeId={active}
      onActivate={setActive}
      onRun={onRun}
      onAdd={onAdd}
      renderCell={(c) => (
        <CellFrame id={c.id} kind={c.kind} collapsed={false} active={active === c.id} onFocusCell={() => setActive(c.id)}>
          <textarea aria-label={`text of ${c.id}`} />
        </CellFrame>
      )}
    />
  );
}

describe('cell column', () => {
  it('labels every cell by its kind in words, with no numbered prompts', () => {
    render(<Column onRun={() => {}} />);
    const column = screen.getByTestId('cell-column');
    const labels = [...column.querySelectorAll('[data-testid="cell-kind"]')].map((e) => e.textContent);
    expect(labels).toEqual(['Notes', 'Data', 'Model', 'Fit']);
    expect(column.textContent).not.toMatch(/\[\s*\d*\s*\]/);
  });

  it('moves between cells with Alt-ArrowDown / Alt-ArrowUp and runs the current one with Mod-Enter', () => {
    const onRun = vi.fn();
    render(<Column onRun={onRun} />);
    const first = screen.getByLabelText('text of a1');
    fireEvent.keyDown(first, { key: 'ArrowDown', altKey: true });
    fireEvent.keyDown(first, { key: 'ArrowDown', altKey: true });
    const active = () => document.querySelector('[data-active="true"]')?.getAttribute('data-cell-id');
    expect(active()).toBe('c3');
    fireEvent.keyDown(screen.getByLabelText('text of c3'), { key: 'ArrowUp', altKey: true });
    expect(active()).toBe('b2');
    fireEvent.keyDown(screen.getByLabelText('text of b2'), { key: 'Enter', ctrlKey: true });
    expect(onRun).toHaveBeenCalledWith('b2');
    fireEvent.keyDown(screen.getByLabelText('text of b2'), { key: 'Enter', metaKey: true });
    expect(onRun).toHaveBeenCalledTimes(2);
  });

  it('offers to add each kind between cells at the right position', () => {
    const onAdd = vi.fn();
    render(<Column onRun={() => {}} onAdd={onAdd} />);
    const gap = screen.getByRole('group', { name: 'Add a cell at position 3' });
    fireEvent.click(within(gap).getByRole('button', { name: 'Add fit cell here' }));
    expect(onAdd).toHaveBeenCalledWith('fit', 2);
  });

  it('key helpers recognise only the documented chords', () => {
    expect(isRunKey({ key: 'Enter', ctrlKey: true, metaKey: false, altKey: false, shiftKey: false })).toBe(true);
    expect(isRunKey({ key: 'Enter', ctrlKey: false, metaKey: false, altKey: false, shiftKey: true })).toBe(false);
    expect(moveKey({ key: 'ArrowUp', ctrlKey: false, metaKey: false, altKey: true, shiftKey: false })).toBe(-1);
    expect(moveKey({ key: 'ArrowUp', ctrlKey: false, metaKey: false, altKey: true, shiftKey: true })).toBe(0);
  });

  it('collapses a cell body and keeps its head', () => {
    const toggle = vi.fn();
    const { rerender } = render(
      <CellFrame id="x1" kind="model" collapsed={false} active={false} onToggleCollapse={toggle}>
        <p>body text</p>
      </CellFrame>,
    );
    fireEvent.click(screen.getByRole('button', { name: 'Collapse model cell' }));
    expect(toggle).toHaveBeenCalled();
    rerender(
      <CellFrame id="x1" kind="model" collapsed active={false} onToggleCollapse={toggle}>
        <p>body text</p>
      </CellFrame>,
    );
    expect(screen.queryByText('body text')).toBeNull();
    expect(screen.getByText('Model')).toBeTruthy();
  });
});

const DATASET: Dataset = {
  id: 'ds1',
  workspaceId: 'w1',
  name: 'orchard',
  rows: 4,
  bytes: 80,
  columns: [
    { name: 'block', type: 'category', missing: 0, levels: ['north', 'south'] },
    { name: 'dose', type: 'integer', missing: 0 },
    { name: 'yield', type: 'numeric', missing: 1 },
  ],
  createdAt: '2026-12-01T00:00:00Z',
};
const ROWS = [
  ['north', 1, 3.5],
  ['south', 2, null],
  ['north', 3, 1.25],
  ['south', 10, 2],
];

describe('data preview', () => {
  it('shows types, row count and the missing-value report', () => {
    render(<DataPreview dataset={DATASET} rows={ROWS} />);
    expect(screen.getByTestId('row-count').textContent).toBe('4');
    expect(screen.getByTestId('missing-report').textContent).toContain('yield: 1');
    const heads = screen.getAllByRole('columnheader').map((h) => h.querySelector('[data-testid="column-type"]')?.textContent);
    expect(heads).toEqual(['category · 2', 'whole', 'number · 1 missing']);
  });

  it('sorts numerically, then descending, then back to file order, missing always last', () => {
    render(<DataPreview dataset={DATASET} rows={ROWS} />);
    const yieldCol = () => screen.getAllByRole('row').slice(1).map((r) => r.querySelectorAll('td')[2].textContent);
    fireEvent.click(screen.getByTitle('Sort by yield'));
    // One count of decimals for the whole column: 2.00 and 3.50 beside 1.25.
    expect(yieldCol()).toEqual(['1.25', '2.00', '3.50', '·']);
    fireEvent.click(screen.getByTitle('Sort by yield'));
    expect(yieldCol()).toEqual(['3.50', '2.00', '1.25', '·']);
    fireEvent.click(screen.getByTitle('Sort by yield'));
    expect(yieldCol()).toEqual(['3.50', '·', '1.25', '2.00']);
  });

  it('warns about a column name a model cannot use, naming one it could, and still shows the table', () => {
    const spaced: Dataset = { ...DATASET, columns: [{ name: 'temp level', type: 'numeric', missing: 0 }, ...DATASET.columns.slice(1)] };
    render(<DataPreview dataset={spaced} rows={ROWS} />);
    const notes = screen.getByTestId('column-name-warnings').querySelectorAll('li');
    expect(notes).toHaveLength(1);
    expect(notes[0].textContent).toContain('"temp level" cannot be used in a model');
    expect(notes[0].textContent).toContain('e.g. to temp_level');
    expect(screen.getAllByRole('row')).toHaveLength(5);
  });

  it('has no column-name note when every name is usable', () => {
    render(<DataPreview dataset={DATASET} rows={ROWS} />);
    expect(screen.queryByTestId('column-name-warnings')).toBeNull();
  });

  it('sortRows compares numbers as numbers (10 after 2)', () => {
    expect(sortRows(ROWS, 1, 'asc').map((r) => r[1])).toEqual([1, 2, 3, 10]);
    expect(sortRows(ROWS, 0, 'desc').map((r) => r[0])).toEqual(['south', 'south', 'north', 'north']);
  });
});

describe('fit settings form', () => {
  const defaults = { chains: 4, warmup: 1000, draws: 1000, seed: 20261201, sampler: 'auto' as const };

  it('shows defaults and limits from the shared settings schema', () => {
    render(<FitSettingsForm value={defaults} readOnly={false} running={false} />);
    expect((screen.getByLabelText('Chains') as HTMLInputElement).value).toBe('4');
    expect(screen.getByText(/1–8, default 4/)).toBeTruthy();
    expect(screen.getByText(/50–20,000, default 1000 · kept per chain/)).toBeTruthy();
  });

  it('refuses out-of-range and non-numeric values with field messages and no run', () => {
    const onRun = vi.fn();
    render(<FitSettingsForm value={defaults} readOnly={false} running={false} onRun={onRun} />);
    fireEvent.change(screen.getByLabelText('Chains'), { target: { value: '9' } });
    expect(screen.getByText('At most 8')).toBeTruthy();
    fireEvent.change(screen.getByLabelText('Draws'), { target: { value: 'many' } });
    expect(screen.getByText('"many" is not a whole number')).toBeTruthy();
    expect((screen.getByRole('button', { name: 'Run fit' }) as HTMLButtonElement).disabled).toBe(true);
    fireEvent.submit(screen.getByRole('form', { name: 'Fit settings' }));
    expect(onRun).not.toHaveBeenCalled();
  });

  it('runs with the parsed settings', () => {
    const onRun = vi.fn();
    const onChange = vi.fn();
    render(<FitSettingsForm value={defaults} readOnly={false} running={false} onRun={onRun} onChange={onChange} />);
    fireEvent.change(screen.getByLabelText('Chains'), { target: { value: '2' } });
    fireEvent.change(screen.getByLabelText('Sampler'), { target: { value: 'hitrun' } });
    expect(onChange).toHaveBeenLastCalledWith({ ...defaults, chains: 2, sampler: 'hitrun' });
    fireEvent.click(screen.getByRole('button', { name: 'Run fit' }));
    expect(onRun).toHaveBeenCalledWith({ ...defaults, chains: 2, sampler: 'hitrun' });
  });

  it('has no run button when read-only and disables its fields', () => {
    render(<FitSettingsForm value={defaults} readOnly running={false} />);
    expect(screen.queryByRole('button', { name: 'Run fit' })).toBeNull();
    expect((screen.getByLabelText('Seed') as HTMLInputElement).disabled).toBe(true);
  });

  it('parseFitDraft rejects fractional counts', () => {
    const r = parseFitDraft({ chains: '2.5', warmup: '100', draws: '100', seed: '1', sampler: 'auto' });
    expect(r.ok).toBe(false);
  });
});

const q = (name: string, over: Partial<QuantitySummary> = {}): QuantitySummary => ({
  name, kind: 'unknown', mean: 1.2345, sd: 0.1, q5: 1.07, q50: 1.23, q95: 1.4, rhat: 1.002, essBulk: 1800, essTail: 1500,
  mcseMean: 0.0023, mcseQ5: 0.004, mcseQ50: 0.003, mcseQ95: 0.004, ...over,
});

describe('quantity rows and verdict', () => {
  it('one row per quantity with its median and 90 % interval; the trust mark and the warning colour only where R̂ > 1.01 or ESS < 100 per chain', () => {
    render(<QuantityRows chains={4} draws={1000} quantities={[q('mu[1]'), q('mu[2]', { rhat: 1.04, essTail: 120 }), q('mu[3]', { rhat: 1.01 }), q('gain', { kind: 'derived' })]} />);
    const rows = screen.getAllByTestId('quantity-row');
    expect(rows).toHaveLength(4);
    expect(rows.map((r) => r.hasAttribute('data-failing'))).toEqual([false, true, false, false]);
    expect(rows[0].textContent).toContain('1.23');
    expect(rows[0].textContent).toContain('1.07 to 1.40');
    expect(rows[1].querySelector('[role="img"]')?.getAttribute('aria-label')).toMatch(/chains disagree.*tails/);
    const fold = screen.getByTestId('mixing-figures');
    expect([...fold.querySelectorAll('.text-alarm')].map((e) => e.textContent)).toEqual(['1.040', '120']);
    expect(screen.getByTestId('summary-table').textContent).toContain('derived');
  });

  it('explains ESS above the number of draws and ESS at its ceiling in footnotes', () => {
    // 2 chains × 100 draws = 200 draws; the ceiling is 200 · log10(200) ≈ 460 (the estimator's floor on τ).
    const cap = 200 * Math.log10(200);
    render(<QuantityRows chains={2} draws={100} quantities={[q('a', { essBulk: 150, essTail: 150 }), q('b', { essBulk: 320, essTail: 210 }), q('c', { essBulk: cap, essTail: 300 })]} />);
    expect(screen.getByTestId('ess-note-above').textContent).toContain('200');
    expect(screen.getByTestId('ess-note-capped').textContent).toContain(String(Math.round(cap)));
    const fold = screen.getByTestId('mixing-figures');
    expect(fold.textContent).toContain('320†');
    expect(fold.textContent).toContain(`${Math.round(cap)}‡`);
  });

  const rules = [
    { rule: 'max R̂ < 1.01', passed: true, detail: '1.003' },
    { rule: 'divergences = 0', passed: false, detail: '12 divergent transitions' },
  ];
  it('a trustworthy verdict uses no warning styling', () => {
    const v: Verdict = { level: 'trustworthy', reason: 'All checks passed.', rules: rules.map((r) => ({ ...r, passed: true })) };
    render(<VerdictBanner verdict={v} />);
    expect(screen.getByTestId('verdict').querySelectorAll('.text-alarm')).toHaveLength(0);
    expect(screen.getByRole('status')).toBeTruthy();
  });
  it('a do-not-use verdict is an alert naming the failed rule', () => {
    const v: Verdict = { level: 'do-not-use', reason: 'Divergent transitions: the sampler could not explore the region.', rules };
    render(<VerdictBanner verdict={v} />);
    const alert = screen.getByRole('alert');
    expect(alert.textContent).toContain('Do not use these results');
    expect(alert.textContent).toContain('12 divergent transitions');
    expect([...alert.querySelectorAll('.text-alarm')].map((e) => e.textContent)).toEqual(['FAIL']);
  });
});

describe('progress', () => {
  it('one bar per chain with phase and iterations per second', () => {
    render(
      <ChainProgress
        chains={3}
        progress={[
          { chain: 1, phase: 'warmup', iteration: 250, total: 2000, itersPerSecond: 812.4 },
          { chain: 2, phase: 'sampling', iteration: 1500, total: 2000, itersPerSecond: 640 },
        ]}
      />,
    );
    const bars = screen.getAllByRole('progressbar');
    expect(bars.map((b) => b.getAttribute('aria-valuenow'))).toEqual(['13', '75', '0']);
    expect(screen.getByText('warm-up · 250/2000 · 812 it/s')).toBeTruthy();
    expect(screen.getByText('waiting')).toBeTruthy();
  });

  it('a lost worker is said, not hidden behind frozen bars; a queued fit shows its place', () => {
    const lost = runStateMessage({ status: 'running', worker: 'lost', queuePosition: null })!;
    render(<ChainProgress chains={1} progress={[{ chain: 1, phase: 'sampling', iteration: 900, total: 2000, itersPerSecond: 400 }]} queuedMessage={lost.text} warning={lost.warning} />);
    expect(screen.getByRole('status').textContent).toMatch(/^Worker lost, resuming/);
    expect(screen.getByTestId('chain-progress').getAttribute('data-stale')).toBe('true');
    expect(runStateMessage({ status: 'running', worker: 'active', queuePosition: null })).toBeUndefined();
    expect(runStateMessage({ status: 'queued', worker: null, queuePosition: 1 })!.text).toMatch(/next in the queue/);
    expect(runStateMessage({ status: 'queued', worker: null, queuePosition: 3 })!.text).toMatch(/3rd in the queue/);
    expect(runStateMessage({ status: 'queued', worker: null, queuePosition: 12 })!.text).toMatch(/12th in the queue/);
    // Answers of servers that do not send the new fields.
    expect(runStateMessage({ status: 'queued' })!.text).toMatch(/Waiting for a worker/);
  });
});

describe('conflict dialog', () => {
  it('shows both texts and lets the person choose', () => {
    const keep = vi.fn();
    const take = vi.fn();
    render(<ConflictDialog kindLabel="Model" theirs={'unknown a\n'} theirVersion={7} mine={'unknown b\n'} onKeepMine={keep} onTakeTheirs={take} />);
    expect(screen.getByTestId('conflict-theirs').textContent).toBe('unknown a\n');
    expect(screen.getByTestId('conflict-mine').textContent).toBe('unknown b\n');
    fireEvent.click(screen.getByRole('button', { name: /Keep mine/ }));
    expect(keep).toHaveBeenCalled();
    fireEvent.click(screen.getByRole('button', { name: 'Take the saved text' }));
    expect(take).toHaveBeenCalled();
  });
});

const cm = (id: string, at: string, over: Partial<Comment> = {}): Comment => ({
  id, cellId: 'c1', author: { id: 'u1', name: 'Rosa' }, body: `body ${id}`, replyTo: null, resolved: false, createdAt: at, updatedAt: at, ...over,
});

describe('comments', () => {
  it('threads replies under their root in time order', () => {
    const t = threadComments([cm('r2', '2026-12-01T10:00:00Z', { replyTo: 'a' }), cm('a', '2026-12-01T09:00:00Z'), cm('r1', '2026-12-01T09:30:00Z', { replyTo: 'a' }), cm('b', '2026-12-01T11:00:00Z')]);
    expect(t.map((x) => [x.root.id, x.replies.map((r) => r.id)])).toEqual([['a', ['r1', 'r2']], ['b', []]]);
  });
  it('posts, replies and resolves; hides resolved threads until asked', () => {
    const onCreate = vi.fn();
    const onResolve = vi.fn();
    render(<CommentsPanel canComment comments={[cm('a', '2026-12-01T09:00:00Z'), cm('z', '2026-12-01T08:00:00Z', { resolved: true })]} onCreate={onCreate} onResolve={onResolve} />);
    expect(screen.getAllByTestId('comment-thread')).toHaveLength(1);
    fireEvent.change(screen.getByLabelText('Comment on this cell…'), { target: { value: '  check the prior  ' } });
    fireEvent.click(screen.getByRole('button', { name: 'Post' }));
    expect(onCreate).toHaveBeenCalledWith('check the prior', null);
    fireEvent.click(screen.getByRole('button', { name: 'resolve' }));
    expect(onResolve).toHaveBeenCalledWith('a', true);
    fireEvent.click(screen.getByRole('button', { name: 'show resolved' }));
    expect(screen.getAllByTestId('comment-thread')).toHaveLength(2);
  });
  it('read-only visitors see threads but no forms', () => {
    render(<CommentsPanel canComment={false} comments={[cm('a', '2026-12-01T09:00:00Z')]} onCreate={() => {}} onResolve={() => {}} />);
    expect(screen.queryByRole('textbox')).toBeNull();
    expect(screen.queryByRole('button', { name: 'resolve' })).toBeNull();
  });
});

import { ModelSidePanel } from '../../../../src/features/notebook/model/model-side-panel';
import { DataUpload, tableNameFromFile } from '../../../../src/features/notebook/data/data-upload';

describe('model side panel', () => {
  it('lists unknowns with shapes, constraint counts and the region status', () => {
    render(
      <ModelSidePanel
        checking={false}
        check={{
          ok: true,
          unknowns: [{ name: 'mu', shape: [6] }, { name: 'sigma', shape: [] }],
          derived: ['gain'],
          tables: ['trial'],
          constraints: { inequalities: 6, equalities: 0 },
          messages: [],
          region: { status: 'interior', message: 'A strictly interior point exists.' },
        }}
      />,
    );
    const panel = screen.getByTestId('model-side-panel');
    expect(panel.textContent).toContain('[6]');
    expect(panel.textContent).toContain('scalar');
    expect(panel.textContent).toContain('7 coordinates in all');
    expect(screen.getByTestId('region-status').textContent).toBe('interior found');
  });
  it('an empty region is flagged with the message naming the constraints', () => {
    render(
      <ModelSidePanel
        checking={false}
        check={{ ok: false, unknowns: [{ name: 'a', shape: [] }], derived: [], tables: [], constraints: { inequalities: 2, equalities: 0 }, messages: [], region: { status: 'empty', message: 'line 3 and line 4 cannot both hold' } }}
      />,
    );
    expect(screen.getByTestId('region-status').querySelector('[data-tone="warning"]')).toBeTruthy();
    expect(screen.getByText('line 3 and line 4 cannot both hold')).toBeTruthy();
  });
});

describe('data upload', () => {
  it('suggests a table name the model language accepts', () => {
    expect(tableNameFromFile('Orchard plots 2026.csv')).toBe('Orchard_plots_2026');
    expect(tableNameFromFile('2026-yield.csv')).toBe('t_2026_yield');
  });
  it('refuses a bad table name before uploading', () => {
    const onUpload = vi.fn();
    render(<DataUpload busy={false} error={null} onUpload={onUpload} />);
    const file = new File(['a,b\n1,2\n'], 'plots.csv', { type: 'text/csv' });
    fireEvent.change(screen.getByLabelText(/^CSV file/), { target: { files: [file] } });
    expect((screen.getByLabelText('Table name') as HTMLInputElement).value).toBe('plots');
    fireEvent.change(screen.getByLabelText('Table name'), { target: { value: '9 lives' } });
    fireEvent.submit(screen.getByRole('form', { name: 'Upload a CSV file' }));
    expect(onUpload).not.toHaveBeenCalled();
    expect(screen.getByTestId('upload-error').textContent).toMatch(/Table name/);
    fireEvent.change(screen.getByLabelText('Table name'), { target: { value: 'plots' } });
    fireEvent.submit(screen.getByRole('form', { name: 'Upload a CSV file' }));
    expect(onUpload).toHaveBeenCalledWith(file, 'plots');
  });
});
