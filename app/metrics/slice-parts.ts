/**
 * The costly parts of the metrics of a volume pair, over whole slices: ‖LoG(reference)‖²,
 * ‖LoG(reference − test)‖² (HFEN, ./hfen.ts) and the per-slice SSIM sums (./ssim.ts). Both filter
 * each 2D slice on its own, so a volume can be cut into runs of slices that are computed apart
 * (worker threads, ./metric-workers.ts) and put back together: energies add up, per-slice SSIM
 * values are concatenated in slice order. The cheap whole-volume sums (squared error, reference
 * energy, data range) stay with the caller.
 */
import { differenceLogEnergy, referenceLogEnergy, type LogEnergy } from './hfen.ts';
import { ssimSlices, type SsimSliceSums } from './ssim.ts';

export interface SliceJob {
  /** Slice-major (slice, row, column) pixels of whole slices. */
  reference: Float32Array;
  /** Null: only the reference's LoG energy is wanted. */
  test: Float32Array | null;
  mask: Uint8Array | null;
  rows: number;
  columns: number;
  dataRange: number;
  /** Whether ‖LoG(reference)‖² is wanted (a prepared reference already has it). */
  referenceLog: boolean;
}

export interface SliceParts {
  referenceLog: LogEnergy | null;
  differenceLog: LogEnergy | null;
  ssim: SsimSliceSums | null;
}

export function slicesOf(job: Pick<SliceJob, 'reference' | 'rows' | 'columns'>): number {
  return job.reference.length / (job.rows * job.columns);
}

/** The parts of one job, over all its slices. */
export function computeSliceParts(job: SliceJob): SliceParts {
  const slices = slicesOf(job);
  const geometry = { rows: job.rows, columns: job.columns };
  return {
    referenceLog: job.referenceLog ? referenceLogEnergy(job.reference, geometry, job.mask, 0, slices) : null,
    differenceLog: job.test ? differenceLogEnergy(job.reference, job.test, geometry, job.mask, 0, slices) : null,
    ssim: job.test ? ssimSlices(job.reference, job.test, geometry, job.dataRange, job.mask, 0, slices) : null,
  };
}

/** Slices [from, to) of a job, as a job of its own (views, no copies). */
export function sliceRange(job: SliceJob, from: number, to: number): SliceJob {
  const plane = job.rows * job.columns;
  return {
    ...job,
    reference: job.reference.subarray(from * plane, to * plane),
    test: job.test?.subarray(from * plane, to * plane) ?? null,
    mask: job.mask?.subarray(from * plane, to * plane) ?? null,
  };
}

const addEnergy = (a: LogEnergy | null, b: LogEnergy | null): LogEnergy | null =>
  a && b ? { all: a.all + b.all, masked: a.masked + b.masked } : a ?? b;

function concat(arrays: Float64Array[]): Float64Array {
  const out = new Float64Array(arrays.reduce((n, a) => n + a.length, 0));
  let at = 0;
  for (const a of arrays) {
    out.set(a, at);
    at += a.length;
  }
  return out;
}

/** The parts of consecutive slice runs, in slice order, as the parts of the whole. */
export function mergeSliceParts(parts: SliceParts[]): SliceParts {
  const ssims = parts.map((p) => p.ssim).filter((s): s is SsimSliceSums => s !== null);
  return {
    referenceLog: parts.reduce<LogEnergy | null>((sum, p) => addEnergy(sum, p.referenceLog), null),
    differenceLog: parts.reduce<LogEnergy | null>((sum, p) => addEnergy(sum, p.differenceLog), null),
    ssim: ssims.length === 0 ? null : {
      mean: concat(ssims.map((s) => s.mean)),
      maskedSum: concat(ssims.map((s) => s.maskedSum)),
      maskedCount: concat(ssims.map((s) => s.maskedCount)),
    },
  };
}
