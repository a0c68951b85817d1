import { useState } from 'react';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { dataContentSchema } from '@shared/api/notebook';
import { errorMessage } from '@/lib/api-client';
import { datasetQuery } from '../api/get-dataset';
import { uploadDataset } from '../api/upload-dataset';
import type { CellViewProps } from '../components/cell-view-props';
import { DataPages } from './data-pages';
import { DataUpload } from './data-upload';
import { buttonClass } from '@/components/ui/button';

export function DataCellView(p: CellViewProps) {
  const content = dataContentSchema.safeParse(p.content);
  const datasetId = content.success ? content.data.datasetId : null;
  const preview = useQuery({ ...datasetQuery(p.access, datasetId ?? ''), enabled: datasetId !== null });
  const qc = useQueryClient();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [replacing, setReplacing] = useState(false);

  const upload = async (file: File, name: string) => {
    if (p.access.mode !== 'member') return;
    setBusy(true);
    setError(null);
    try {
      const res = await uploadDataset(p.access.workspaceId, file, name);
      qc.setQueryData(datasetQuery(p.access, res.dataset.id).queryKey, res);
      p.setContent({ datasetId: res.dataset.id });
      setReplacing(false);
    } catch (e) {
      setError(errorMessage(e));
    } finally {
      setBusy(false);
    }
  };

  return (
    <div className="flex flex-col gap-3">
      {datasetId === null ? (
        p.readOnly ? <p className="truncate text-[0.8rem] text-ink-soft">No table uploaded yet.</p> : <DataUpload busy={busy} error={error} onUpload={upload} />
      ) : preview.isPending ? (
        <p className="truncate text-[0.8rem] text-ink-soft">Loading the table…</p>
      ) : preview.isError ? (
        <p className="mt-[0.2rem] text-[0.75rem] font-semibold text-ink">Could not load the table: {errorMessage(preview.error)}</p>
      ) : (
        <>
          <DataPages access={p.access} dataset={preview.data.dataset} firstRows={preview.data.rows} />
          {!p.readOnly &&
            (replacing ? (
              <DataUpload busy={busy} error={error} onUpload={upload} />
            ) : (
              <div>
                <button type="button" className={buttonClass('secondary', 'xs')} onClick={() => setReplacing(true)}>
                  Replace the table
                </button>
              </div>
            ))}
        </>
      )}
    </div>
  );
}
