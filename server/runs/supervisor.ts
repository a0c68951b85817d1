/**
 * The fit worker as a child process of the server (`npm start`): fits never share the server's
 * main thread or its fate. A worker that exits is started again after a pause (longer after each
 * quick exit); its runs resume from their stored chains once their leases expire.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const WORKER_MAIN = path.join(path.dirname(fileURLToPath(import.meta.url)), 'worker-main.ts');

export interface WorkerSupervisor {
  /** Pid of the live worker process, if any. */
  pid(): number | undefined;
  /** Stop the worker (SIGTERM; its runs are abandoned to their leases) and stop restarting it. */
  stop(): Promise<void>;
}

export function superviseWorker(opts: { env: NodeJS.ProcessEnv; slots: number; log?: (m: string) => void }): WorkerSupervisor {
  const log = opts.log ?? ((m) => console.log(`[slackline] ${m}`));
  let child: ChildProcess | null = null;
  let stopping = false;
  let delay = 1_000;
  let timer: NodeJS.Timeout | null = null;

  const launch = () => {
    timer = null;
    if (stopping) return;
    const started = Date.now();
    const c = spawn(process.execPath, ['--import', 'tsx', WORKER_MAIN], {
      env: { ...opts.env, FIT_SLOTS: String(opts.slots), WORKER_ABANDON_ON_TERM: 'true' },
      stdio: ['ignore', 'inherit', 'inherit'],
    });
    child = c;
    log(`fit worker started (pid ${c.pid}, ${opts.slots} slot(s))`);
    c.on('error', (e) => log(`fit worker could not start: ${e.message}`));
    c.on('exit', (code, signal) => {
      child = null;
      if (stopping) return;
      // Quick exits back off (up to 30 s); a worker that ran a while is restarted after 1 s.
      delay = Date.now() - started > 60_000 ? 1_000 : Math.min(30_000, delay * 2);
      log(`fit worker exited (${signal ?? `code ${code}`}); starting another in ${Math.round(delay / 1000)} s`);
      timer = setTimeout(launch, delay);
      timer.unref();
    });
  };
  launch();

  return {
    pid: () => child?.pid,
    stop: () =>
      new Promise<void>((resolve) => {
        stopping = true;
        if (timer) clearTimeout(timer);
        const c = child;
        if (!c || c.exitCode !== null) return resolve();
        const kill = setTimeout(() => c.kill('SIGKILL'), 4_000);
        c.once('exit', () => {
          clearTimeout(kill);
          resolve();
        });
        c.kill('SIGTERM');
      }),
  };
}
