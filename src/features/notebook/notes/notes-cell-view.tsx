import type { CellViewProps } from '../components/cell-view-props';
import { NotesCell } from './notes-cell';

export function NotesCellView(p: CellViewProps) {
  return <NotesCell text={p.source} editing={p.editingNotes} readOnly={p.readOnly} onChange={p.setSource} onEditingChange={p.setEditingNotes} />;
}
