import type { NbCell } from '@shared/api/notebook';

/** A label for a model cell in pickers: its first comment line, else its first unknown. */
export function modelLabel(cell: NbCell, index: number): string {
  const comment = cell.source.split('\n').find((l) => l.trim().startsWith('#'));
  if (comment) return comment.replace(/^\s*#+\s*/, '').slice(0, 60) || `Model ${index + 1}`;
  const unknown = cell.source.match(/^\s*unknown\s+([A-Za-z_]\w*)/m);
  return unknown ? `Model with ${unknown[1]}` : `Model cell ${index + 1}`;
}
