import type { NbCell } from '@shared/api/notebook';
import type { DataSchema } from '@shared/lang';
import type { NotebookAccess } from '../api/access';

/** What the notebook page hands the view of each cell, whatever its kind. */
export interface CellViewProps {
  cell: NbCell;
  access: NotebookAccess;
  readOnly: boolean;
  /** Draft of this cell (text and content) with its setters. */
  source: string;
  content: unknown;
  setSource: (s: string) => void;
  setContent: (c: unknown) => void;
  /** Every cell of the notebook (fit and compare cells pick model cells from it). */
  cells: NbCell[];
  /** Tables bound by data cells, for the model editor's completion and checks. */
  schema: DataSchema;
  /** Set by the page when Mod-Enter asks this cell to run. */
  runSignal: number;
  editingNotes: boolean;
  setEditingNotes: (v: boolean) => void;
  /** Runs this cell as Mod-Enter does (for editors that take the key before the column sees it). */
  onRun?: () => void;
}
