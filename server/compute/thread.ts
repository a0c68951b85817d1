/** Inside a compute thread: run the task each message names and answer with its output. */
import { parentPort } from 'node:worker_threads';
import { TASKS, type TaskName } from './tasks';

interface Request {
  id: number;
  name: TaskName;
  input: unknown;
}

parentPort!.on('message', async (msg: Request) => {
  try {
    const task = TASKS[msg.name] as (input: unknown) => { output: unknown; transfer?: ArrayBuffer[] } | Promise<{ output: unknown; transfer?: ArrayBuffer[] }>;
    if (!task) throw new Error(`unknown compute task "${msg.name}"`);
    const { output, transfer } = await task(msg.input);
    parentPort!.postMessage({ id: msg.id, ok: true, output }, transfer ?? []);
  } catch (e) {
    const err = e instanceof Error ? { name: e.name, message: e.message } : { name: 'Error', message: String(e) };
    parentPort!.postMessage({ id: msg.id, ok: false, error: err });
  }
});
