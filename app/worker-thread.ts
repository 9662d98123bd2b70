/**
 * Starts one of app/'s worker entries (a .cjs file that compiles the TypeScript it needs itself,
 * ./metrics/metric-worker.cjs, ./blinding/build-worker.cjs). The worker takes the process's Node
 * flags except those that only concern a main script given inline (--input-type, as with -e); if
 * Node refuses some of them for a worker (V8 flags such as --trace-gc are process-wide), it
 * starts with none, which the entries do not need.
 */
import { Worker } from 'node:worker_threads';

export function startWorker(entry: URL): Worker {
  try {
    return new Worker(entry, { execArgv: process.execArgv.filter((a) => !a.startsWith('--input-type')) });
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== 'ERR_WORKER_INVALID_EXEC_ARGV') throw e;
    return new Worker(entry, { execArgv: [] });
  }
}
