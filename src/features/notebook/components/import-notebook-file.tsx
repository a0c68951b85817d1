import { useId, useRef, useState, type ChangeEvent } from 'react';
import { useNavigate } from 'react-router-dom';
import { useQueryClient } from '@tanstack/react-query';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { errorMessage } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';
import { importNotebookFile } from '../api/import-notebook';

/**
 * On the notebook list: read a Slackline notebook file into a new notebook of this workspace, then
 * open it. A refused file leaves a one-sentence reason naming the first problem.
 */
export function ImportNotebookFile({ workspaceId }: { workspaceId: string }) {
  const navigate = useNavigate();
  const qc = useQueryClient();
  const uid = useId();
  const fileRef = useRef<HTMLInputElement>(null);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const onImport = async (e: ChangeEvent<HTMLInputElement>) => {
    const f = e.target.files?.[0];
    e.target.value = '';
    if (!f) return;
    setBusy(true);
    setError(null);
    try {
      const res = await importNotebookFile(workspaceId, f);
      await qc.invalidateQueries({ queryKey: queryKeys.notebookList(workspaceId) });
      navigate(`/w/${workspaceId}/n/${res.notebook.id}`);
    } catch (err) {
      setError(errorMessage(err));
    } finally {
      setBusy(false);
    }
  };
  return (
    <div className="flex flex-col gap-2">
      <div className="flex flex-wrap items-center gap-3">
        <Button type="button" variant="secondary" pending={busy} onClick={() => fileRef.current?.click()} aria-describedby={`${uid}-hint`}>
          Import a notebook file
        </Button>
        <span id={`${uid}-hint`} className="text-sm text-ink-faint">
          A Slackline notebook file (.json) becomes a new notebook here, with its tables.
        </span>
        <input ref={fileRef} type="file" accept=".json,application/json" hidden onChange={onImport} aria-label="Notebook file to import" />
      </div>
      {error && <Banner tone="notice">{error}</Banner>}
    </div>
  );
}
