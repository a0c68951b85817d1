/** The data tables the editor knows about, shared by completion and lint through a facet. */
import { Facet } from '@codemirror/state';
import type { DataSchema } from '@shared/lang';

export const schemaFacet = Facet.define<DataSchema, DataSchema>({
  combine: (values) => (values.length > 0 ? values[values.length - 1] : {}),
});
