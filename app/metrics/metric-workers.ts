/**
 * Worker threads for the costly slice parts of the metrics (./slice-parts.ts: the LoG filters of
 * HFEN and the SSIM windows). A pair's slices are cut into one run per thread; the calling thread
 * computes the first run while the workers compute the others on copies of theirs, and the parts
 * are merged in slice order, so the result is the one-thread result (energies summed in another
 * order may differ in the last bits). Small pairs stay in the calling thread, where copying and
 * messaging would cost more than they save. A worker that cannot start or fails leaves its run
 * to the calling thread.
 */
import { availableParallelism } from 'node:os';
import type { Worker } from 'node:worker_threads';
import { startWorker } from '../worker-thread.ts';
import { computeSliceParts, mergeSliceParts, sliceRange, slicesOf, type SliceJob, type SliceParts } from './slice-parts.ts';

/** Pairs smaller than this (voxels) are computed in the calling thread. */
export const MIN_VOXELS_TO_SPLIT = 1 << 20;

/** One worker per core beyond the calling thread's, at most seven. */
export function defaultWorkerCount(): number {
  return Math.max(0, Math.min(availableParallelism() - 1, 7));
}

interface Pending {
  worker: Worker;
  ok: (parts: SliceParts) => void;
  fail: (e: Error) => void;
}

type Reply = { id: number; parts: SliceParts; error?: undefined } | { id: number; error: string };

/** A copy of a job whose arrays own exactly their bytes, so they can be transferred. */
function detached(job: SliceJob): { job: SliceJob; transfer: ArrayBuffer[] } {
  const copy = { ...job, reference: job.reference.slice(), test: job.test?.slice() ?? null, mask: job.mask?.slice() ?? null };
  const transfer = [copy.reference.buffer, copy.test?.buffer, copy.mask?.buffer].filter((b): b is ArrayBuffer => b instanceof ArrayBuffer);
  return { job: copy, transfer };
}

export class MetricWorkers {
  private readonly workers: Worker[] = [];
  private readonly broken = new Set<Worker>();
  private readonly pending = new Map<number, Pending>();
  private nextId = 1;
  /** Slice runs computed by workers, and runs a failed worker left to the calling thread. */
  readonly runs = { byWorkers: 0, takenBack: 0 };

  /**
   * Starts `count` workers now, so that they boot while the caller reads its volumes. Pairs of
   * fewer than `minVoxels` voxels stay in the calling thread.
   */
  constructor(count = defaultWorkerCount(), private readonly minVoxels = MIN_VOXELS_TO_SPLIT) {
    for (let i = 0; i < count; i++) {
      const w = startWorker(new URL('./metric-worker.cjs', import.meta.url));
      w.on('message', (m: Reply) => {
        const p = this.pending.get(m.id);
        if (!p) return;
        this.pending.delete(m.id);
        if (m.error !== undefined) p.fail(new Error(m.error));
        else p.ok(m.parts);
      });
      w.on('error', (e) => this.lose(w, e));
      w.on('exit', (code) => this.lose(w, new Error(`metric worker stopped (exit ${code})`)));
      this.workers.push(w);
    }
  }

  private lose(w: Worker, e: Error): void {
    if (this.broken.has(w)) return;
    this.broken.add(w);
    // Whatever it was computing is recomputed by the caller.
    for (const [id, p] of this.pending) if (p.worker === w) {
      this.pending.delete(id);
      p.fail(e);
    }
  }

  private send(w: Worker, job: SliceJob): Promise<SliceParts> {
    return new Promise((ok, fail) => {
      const id = this.nextId++;
      this.pending.set(id, { worker: w, ok, fail });
      const { job: copy, transfer } = detached(job);
      w.postMessage({ id, job: copy }, transfer);
    });
  }

  /** The slice parts of a job, computed by every thread at hand. */
  async parts(job: SliceJob): Promise<SliceParts> {
    const live = this.workers.filter((w) => !this.broken.has(w));
    const slices = slicesOf(job);
    const n = Math.min(live.length + 1, slices);
    if (n <= 1 || job.reference.length < this.minVoxels) return computeSliceParts(job);
    const bounds = Array.from({ length: n + 1 }, (_, i) => Math.round((i * slices) / n));
    const runs = bounds.slice(0, n).map((from, i) => sliceRange(job, from, bounds[i + 1]));
    const remote = runs.slice(1).map((run, i) => this.send(live[i], run).then(
      (parts) => (this.runs.byWorkers++, parts),
      () => (this.runs.takenBack++, computeSliceParts(run)),
    ));
    const local = computeSliceParts(runs[0]);
    return mergeSliceParts([local, ...(await Promise.all(remote))]);
  }

  async close(): Promise<void> {
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}
