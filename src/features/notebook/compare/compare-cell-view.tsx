import { useMemo } from 'react';
import { compareContentSchema } from '@shared/api/notebook';
import type { CellViewProps } from '../components/cell-view-props';
import { modelLabel } from '../model/model-label';
import { CompareCell } from './compare-cell';

export function CompareCellView(p: CellViewProps) {
  const parsed = compareContentSchema.safeParse(p.content);
  const selected = parsed.success ? parsed.data.modelCellIds : [];
  const models = useMemo(() => p.cells.filter((c) => c.kind === 'model').map((c, i) => ({ id: c.id, label: modelLabel(c, i) })), [p.cells]);
  return <CompareCell models={models} selected={selected} readOnly={p.readOnly} onChange={(ids) => p.setContent({ modelCellIds: ids })} />;
}
