/** Shaping draws for plots: even thinning. */

import { thinIndices } from '@shared/thin-indices';

export { thinIndices };

export function thin<T>(values: ArrayLike<T>, max: number): T[] {
  return thinIndices(values.length, max).map((k) => values[k]);
}
