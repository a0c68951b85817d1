import { useMemo } from 'react';
import type { CompareContent } from '@shared/api/compare';
import type { CellViewProps } from '../components/cell-view-props';
import { modelLabel } from '../model/model-label';
import { CompareView } from './compare-view';

export function CompareCellView(p: CellViewProps) {
  const models = useMemo(() => p.cells.filter((c) => c.kind === 'model').map((c, i) => ({ id: c.id, label: modelLabel(c, i), source: c.source })), [p.cells]);
  return (
    <CompareView
      cellId={p.cell.id}
      access={p.access}
      readOnly={p.readOnly}
      content={p.content}
      setContent={(c: CompareContent) => p.setContent(c)}
      models={models}
      runSignal={p.runSignal}
    />
  );
}
