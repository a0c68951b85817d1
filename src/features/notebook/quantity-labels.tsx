/**
 * Labels for the quantities of a fit's results: an unknown gathered by a category column shows its
 * level names (`share[1] (north)`); every other name shows as stored. The notebook view provides
 * them for each fit cell from the model that cell fits and the notebook's tables; the results rows
 * read them. Stored names (exports, plots' choices) stay as they are.
 */
import { createContext, useContext } from 'react';
import { checkProgram, elementLabels, type DataSchema } from '@shared/lang';
import { fitContentSchema, type NbCell } from '@shared/api/notebook';

export type QuantityLabel = (name: string) => string;

const identity: QuantityLabel = (name) => name;

export const QuantityLabelsContext = createContext<QuantityLabel>(identity);

export function useQuantityLabel(): QuantityLabel {
  return useContext(QuantityLabelsContext);
}

/** The model cell a fit cell fits: its chosen one, else the nearest model cell above, else the first. */
export function fitModelCell(fit: NbCell, cells: readonly NbCell[], content: unknown): NbCell | null {
  const parsed = fitContentSchema.safeParse(content);
  const chosen = parsed.success ? parsed.data.modelCellId : null;
  const models = cells.filter((c) => c.kind === 'model');
  if (chosen) return models.find((m) => m.id === chosen) ?? null;
  const above = models.filter((c) => c.position < fit.position);
  return above[above.length - 1] ?? models[0] ?? null;
}

/**
 * Labels from a model program and the level names of the notebook's category columns
 * (`levels[table][column]`). Only elements of unknowns gathered by a category column get a label.
 */
export function quantityLabels(source: string, schema: DataSchema, levels: Record<string, Record<string, readonly string[]>>): QuantityLabel {
  const check = checkProgram(source, schema);
  const map = elementLabels(check.program, check.unknowns, (t, c) => levels[t]?.[c]);
  if (map.size === 0) return identity;
  return (name) => map.get(name) ?? name;
}
