import { useEffect, useState } from 'react';
import { ModelEditor } from '@/features/model-editor';
import { useModelCheck, useSharedModelCheck } from '../api/check-model';
import type { CellViewProps } from '../components/cell-view-props';
import { ModelSidePanel } from './model-side-panel';

export function ModelCellView(p: CellViewProps) {
  const [debounced, setDebounced] = useState(p.source);
  useEffect(() => {
    const t = setTimeout(() => setDebounced(p.source), 600);
    return () => clearTimeout(t);
  }, [p.source]);
  // Every member checks through the workspace (readers included: a check changes nothing);
  // share-link readers ask for the stored cell's check.
  const member = p.access.mode === 'member';
  const memberCheck = useModelCheck(p.access.mode === 'member' ? p.access.workspaceId : '', p.access.notebookId, debounced, member);
  const sharedCheck = useSharedModelCheck(p.access.mode === 'share' ? p.access.token : '', p.cell.id, p.cell.source, p.access.mode === 'share');
  const check = member ? memberCheck : sharedCheck;
  return (
    <div className="grid grid-cols-[minmax(0,1fr)_minmax(12rem,16rem)] gap-4 max-[720px]:grid-cols-[minmax(0,1fr)]">
      <div style={{ minWidth: 0 }}>
        <ModelEditor value={p.source} onChange={p.setSource} schema={p.schema} readOnly={p.readOnly} label="Model program" onRun={() => p.onRun?.()} />
      </div>
      <ModelSidePanel check={check.data ?? null} checking={check.isFetching} readOnly={p.readOnly} />
    </div>
  );
}
