/** The model check on a compute thread (see server/compute): the compile route, run creation, run regions. */
import { computePool } from '../compute/pool';
import type { CheckModelOutput } from '../compute/tasks';
import type { DataTables } from '../engine/types';
import { computeFailure } from './datasets';

/**
 * Check a program against tables (and, with `region`, test the region for an interior point) off
 * the main thread. A check past the pool's time limit is stopped and answered with a 422 saying so.
 */
export async function checkModelOffThread(source: string, tables: DataTables, region: boolean, regionNames?: string[]): Promise<CheckModelOutput> {
  try {
    return await computePool().run('checkModel', { source, tables, region, ...(regionNames ? { regionNames } : {}) });
  } catch (e) {
    throw computeFailure(e, region ? 'Checking the model and its region' : 'Checking the model');
  }
}
