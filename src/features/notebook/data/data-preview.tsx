import { useMemo, useState, type ReactNode } from 'react';
import type { Dataset, PreviewValue } from '@shared/api/notebook';
import { columnDecimals, formatDataFixed } from '@/lib/estimates';
import { columnNameWarning, isModelName } from '@shared/data';

export type SortDir = 'asc' | 'desc';

/** Sort preview rows by one column: numbers numerically, labels alphabetically, missing always last. */
export function sortRows(rows: readonly PreviewValue[][], col: number, dir: SortDir): PreviewValue[][] {
  const sign = dir === 'asc' ? 1 : -1;
  return rows
    .map((r, i) => ({ r, i }))
    .sort((p, q) => {
      const a = p.r[col];
      const b = q.r[col];
      if (a === null || a === undefined) return b === null || b === undefined ? p.i - q.i : 1;
      if (b === null || b === undefined) return -1;
      let c: number;
      if (typeof a === 'number' && typeof b === 'number') c = a - b;
      else c = String(a).localeCompare(String(b), undefined, { numeric: true });
      return c !== 0 ? sign * c : p.i - q.i;
    })
    .map((x) => x.r);
}

const TYPE_WORDS = { numeric: 'number', integer: 'whole', category: 'category' } as const;

export interface DataPreviewProps {
  // share-link readers get no workspace id
  dataset: Omit<Dataset, 'workspaceId'>;
  rows: PreviewValue[][];
  /** Paging controls shown under the table instead of the "first rows" note (data-pages.tsx). */
  pager?: ReactNode;
}

/** Preview of a dataset: column types and missing counts, a sortable table, the row count. */
export function DataPreview({ dataset, rows, pager }: DataPreviewProps) {
  const [sort, setSort] = useState<{ col: number; dir: SortDir } | null>(null);
  const sorted = useMemo(() => (sort ? sortRows(rows, sort.col, sort.dir) : rows), [rows, sort]);
  // One count of decimals per number column, so trailing zeros are kept beside values that need them.
  const decimals = useMemo(() => dataset.columns.map((c, j) => (c.type === 'numeric' ? columnDecimals(rows.map((r) => r[j]).filter((v): v is number => typeof v === 'number')) : null)), [dataset.columns, rows]);
  const missingTotal = dataset.columns.reduce((s, c) => s + c.missing, 0);
  // Stored anyway; a model cannot name these columns until they are renamed in the file.
  const unusable = dataset.columns.filter((c) => !isModelName(c.name));

  const toggle = (col: number) =>
    setSort((s) => (s && s.col === col ? (s.dir === 'asc' ? { col, dir: 'desc' } : null) : { col, dir: 'asc' }));

  return (
    <div className="flex flex-col gap-2" data-testid="data-preview">
      <p className="text-sm">
        Table <strong className="font-mono tabular-nums">{dataset.name}</strong> · <span className="font-mono tabular-nums text-right whitespace-nowrap" data-testid="row-count">{dataset.rows}</span> rows ·{' '}
        {dataset.columns.length} columns ·{' '}
        {missingTotal === 0 ? 'no missing values' : <span data-testid="missing-report">{missingTotal} missing value{missingTotal === 1 ? '' : 's'} ({dataset.columns.filter((c) => c.missing > 0).map((c) => `${c.name}: ${c.missing}`).join(', ')})</span>}
      </p>
      {unusable.length > 0 && (
        <ul className="m-0 list-none border-l-[3px] border-ink-soft py-1 pl-3 text-sm" role="status" data-testid="column-name-warnings">
          {unusable.map((c) => (
            <li key={c.name}>{columnNameWarning(c.name)}</li>
          ))}
        </ul>
      )}
      <div className="overflow-auto" style={{ maxHeight: '22rem' }}>
        <table className="w-full border-collapse text-[0.82rem] [&_th]:border-b [&_th]:border-rule-strong [&_th]:px-[0.6rem] [&_th]:py-[0.3rem] [&_th]:text-right [&_th]:font-medium [&_th]:whitespace-nowrap [&_th]:text-ink-soft [&_td]:border-b [&_td]:border-rule [&_td]:px-[0.6rem] [&_td]:py-1 [&_th:first-child]:text-left [&_td:first-child]:text-left [&_tbody_tr:hover_td]:bg-slack/5">
          <thead>
            <tr>
              {dataset.columns.map((c, i) => {
                const active = sort?.col === i;
                return (
                  <th key={c.name} scope="col" aria-sort={active ? (sort!.dir === 'asc' ? 'ascending' : 'descending') : 'none'} style={{ textAlign: c.type === 'category' ? 'left' : 'right' }}>
                    <button type="button" className="cursor-pointer border-0 bg-transparent p-0 [font:inherit] text-inherit" onClick={() => toggle(i)} title={`Sort by ${c.name}`}>
                      <span className="font-mono tabular-nums" style={{ color: 'var(--color-ink)' }}>{c.name}</span>
                      <span aria-hidden>{active ? (sort!.dir === 'asc' ? ' ↑' : ' ↓') : ''}</span>
                    </button>
                    <div data-testid="column-type" className="text-[0.65rem] font-medium tracking-[0.08em] text-ink-soft uppercase" title={c.levels ? `levels: ${c.levels.join(', ')}` : undefined}>
                      {TYPE_WORDS[c.type]}
                      {c.type === 'category' && c.levels ? ` · ${c.levels.length}` : ''}
                      {c.missing > 0 ? ` · ${c.missing} missing` : ''}
                    </div>
                  </th>
                );
              })}
            </tr>
          </thead>
          <tbody>
            {sorted.map((r, i) => (
              <tr key={i}>
                {r.map((v, j) => {
                  const col = dataset.columns[j];
                  return (
                    <td key={j} className={col?.type === 'category' ? 'font-mono tabular-nums' : 'font-mono tabular-nums text-right whitespace-nowrap'} style={col?.type === 'category' ? { textAlign: 'left' } : undefined}>
                      {v === null ? <span style={{ color: 'var(--color-ink-soft)' }}>·</span> : typeof v === 'number' ? (col?.type === 'integer' ? String(v) : formatDataFixed(v, decimals[j] ?? null)) : v}
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {pager ?? (rows.length < dataset.rows && (
        <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft">
          Showing the first {rows.length} of {dataset.rows} rows{sort ? ' (sorting applies to the rows shown)' : ''}.
        </p>
      ))}
    </div>
  );
}
