import { useState } from 'react';
import { DATASET_PREVIEW_ROWS, type Dataset, type PreviewValue } from '@shared/api/notebook';
import { buttonClass } from '@/components/ui/button';
import { errorMessage } from '@/lib/api-client';
import type { NotebookAccess } from '../api/access';
import { useDatasetRows } from '../api/get-dataset-rows';
import { DataPreview } from './data-preview';

/**
 * The data preview with paging: the first page comes with the dataset, later pages are fetched
 * page by page (the server reads them from the table's stored columns).
 */
export function DataPages({ access, dataset, firstRows }: { access: NotebookAccess; dataset: Omit<Dataset, 'workspaceId'>; firstRows: PreviewValue[][] }) {
  const [offset, setOffset] = useState(0);
  const page = useDatasetRows(access, dataset.id, offset, offset > 0);
  const rows = offset === 0 ? firstRows : (page.data?.rows ?? []);
  const size = DATASET_PREVIEW_ROWS;
  const total = dataset.rows;
  const last = Math.min(offset + rows.length, total);
  const pager =
    total > size ? (
      <div className="mt-[0.2rem] flex items-center gap-2 text-[0.72rem] text-ink-soft" data-testid="data-pager">
        <button type="button" className={buttonClass('secondary', 'xs')} disabled={offset === 0} onClick={() => setOffset(Math.max(0, offset - size))}>
          Previous rows
        </button>
        <span className="font-mono tabular-nums" data-testid="data-page-range">
          Rows {total === 0 ? 0 : offset + 1}–{last} of {total}
        </span>
        <button type="button" className={buttonClass('secondary', 'xs')} disabled={offset + size >= total} onClick={() => setOffset(offset + size)}>
          Next rows
        </button>
        <span>(sorting applies to the rows shown)</span>
        {page.isFetching && <span>Loading…</span>}
        {page.isError && <span className="font-semibold text-ink">Could not load these rows: {errorMessage(page.error)}</span>}
      </div>
    ) : undefined;
  return <DataPreview dataset={dataset} rows={rows} pager={pager} />;
}
