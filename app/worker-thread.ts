/**
 * Starts one of app/'s worker entries (a .cjs file that compiles the TypeScript it needs itself,
 * ./metrics/metric-worker.cjs, ./blinding/build-worker.cjs). The worker takes the process's Node
 * flags except those that only concern a main script given inline (--input-type, as with -e).
 */
import { Worker } from 'node:worker_threads';

export function startWorker(entry: URL): Worker {
  return new Worker(entry, { execArgv: process.execArgv.filter((a) => !a.startsWith('--input-type')) });
}
