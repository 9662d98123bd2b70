/**
 * The four image metrics of one test volume against its reference, with and without a foreground
 * mask, and the conventions they were computed under (printed with every report).
 *
 * For `veil build`, prepare a case's reference once (`prepareReference`: data range, mask, and the
 * reference-only parts of NRMSE and HFEN) and compare each method's volume to it
 * (`compareToReference`). `compareVolumes` does both for a single pair; `compareVolumesInParallel`
 * does it with worker threads (`veil metrics`; ./metric-workers.ts).
 *
 * Formulas and references: ./psnr.ts, ./ssim.ts, ./nrmse.ts, ./hfen.ts, ./data-range.ts,
 * ./foreground-mask.ts.
 */
import type { Volume } from '../images/volume.ts';
import { intensityRange, referenceDataRange } from './data-range.ts';
import { autoForegroundMask, maskFromVolume, requireSameShape, shapeText } from './foreground-mask.ts';
import type { ForegroundMask } from './foreground-mask.ts';
import { HFEN_SIGMA, HFEN_SIZE, hfenFromParts, referenceLogEnergy } from './hfen.ts';
import type { LogEnergy } from './hfen.ts';
import type { MetricWorkers } from './metric-workers.ts';
import { MetricsError } from './metrics-error.ts';
import { nrmseFromSums, referenceEnergy } from './nrmse.ts';
import { psnrFromMse, squaredError } from './psnr.ts';
import { computeSliceParts, type SliceJob, type SliceParts } from './slice-parts.ts';
import { SSIM_K1, SSIM_K2, SSIM_SIGMA, SSIM_TRUNCATE, SSIM_WINDOW, combineSsim } from './ssim.ts';

export interface MetricOptions {
  /** L for PSNR and SSIM; default max(reference) − min(reference). */
  dataRange?: number;
  /** 'auto' (Otsu + largest component, holes filled, on the reference), a mask volume, or none. */
  mask?: 'auto' | Volume | null;
}

export interface PreparedReference {
  volume: Volume;
  dataRange: number;
  dataRangeSource: 'reference' | 'given';
  mask: ForegroundMask | null;
  /** Σ x² (NRMSE's denominator) and ‖LoG(x)‖² (HFEN's), plain and masked. */
  energy: { all: number; masked: number };
  logEnergy: LogEnergy;
}

export interface MetricSet {
  /** dB; +∞ for identical volumes (null in JSON). */
  psnr: number;
  ssim: number;
  nrmse: number;
  hfen: number;
}

export interface MaskedMetricSet {
  psnr: number;
  /** Null when no mask pixel lies in any slice's SSIM interior. */
  ssim: number | null;
  nrmse: number;
  hfen: number;
  /** Mask voxels. */
  voxels: number;
  /** Slices whose SSIM interior holds mask pixels (the masked SSIM averages over these). */
  ssim_slices: number;
}

export interface MaskDescription {
  source: 'auto' | 'file';
  path?: string;
  threshold?: number;
  components?: number;
  /** Voxels added by filling holes (automatic mask). */
  filled?: number;
  voxels: number;
  /** Share of all voxels. */
  fraction: number;
}

export interface VolumeMetrics extends MetricSet {
  data_range: number;
  slices: number;
  data_range_source: 'reference' | 'given';
  /** [slices, rows, columns]. */
  shape: [number, number, number];
  mask: MaskDescription | null;
  masked: MaskedMetricSet | null;
  /** One line per convention: how every number above was computed. */
  conventions: string[];
}

/** Everything of a prepared reference but its LoG energy (the costly part). */
function prepareBasics(reference: Volume, options: MetricOptions): Omit<PreparedReference, 'logEnergy'> {
  if (reference.rows < SSIM_WINDOW || reference.columns < SSIM_WINDOW) {
    throw new MetricsError(
      `${reference.provenance.path}: slices of ${reference.rows}x${reference.columns} pixels are too small for SSIM, ` +
        `whose Gaussian window is ${SSIM_WINDOW}x${SSIM_WINDOW}; metrics need slices of at least that size`,
    );
  }
  const measured = referenceDataRange(reference); // also rejects non-finite pixels
  let dataRange = measured;
  if (options.dataRange !== undefined) {
    if (!(Number.isFinite(options.dataRange) && options.dataRange > 0)) {
      throw new MetricsError(`data range ${options.dataRange} is not valid; give a positive number`);
    }
    dataRange = options.dataRange;
  } else if (!(dataRange > 0)) {
    throw new MetricsError(
      `${reference.provenance.path}: the reference has one value throughout, so its data range is 0; give the data range explicitly`,
    );
  }
  let mask: ForegroundMask | null = null;
  if (options.mask === 'auto') mask = autoForegroundMask(reference);
  else if (options.mask) mask = maskFromVolume(options.mask, reference);
  const m = mask?.mask ?? null;
  return {
    volume: reference,
    dataRange,
    dataRangeSource: options.dataRange !== undefined ? 'given' : 'reference',
    mask,
    energy: referenceEnergy(reference.pixels, m),
  };
}

export function prepareReference(reference: Volume, options: MetricOptions = {}): PreparedReference {
  const basics = prepareBasics(reference, options);
  return { ...basics, logEnergy: referenceLogEnergy(reference.pixels, reference, basics.mask?.mask ?? null, 0, reference.slices) };
}

/** The slice-parts job of a test volume against a (partly) prepared reference. */
function sliceJob(prepared: Omit<PreparedReference, 'logEnergy'>, test: Volume | null, referenceLog: boolean): SliceJob {
  const reference = prepared.volume;
  if (test) {
    requireSameShape(reference, test, 'test and reference differ in shape');
    intensityRange(test); // rejects a test volume with NaN or infinite pixels, naming it
  }
  return {
    reference: reference.pixels, test: test?.pixels ?? null, mask: prepared.mask?.mask ?? null,
    rows: reference.rows, columns: reference.columns, dataRange: prepared.dataRange, referenceLog,
  };
}

export function compareToReference(prepared: PreparedReference, test: Volume): VolumeMetrics {
  return metricsFrom(prepared, test, computeSliceParts(sliceJob(prepared, test, false)));
}

/** compareToReference with the costly parts spread over worker threads. */
export async function compareToReferenceInParallel(prepared: PreparedReference, test: Volume, workers: MetricWorkers): Promise<VolumeMetrics> {
  return metricsFrom(prepared, test, await workers.parts(sliceJob(prepared, test, false)));
}

/** prepareReference with the LoG energy computed by worker threads. */
export async function prepareReferenceInParallel(reference: Volume, options: MetricOptions, workers: MetricWorkers): Promise<PreparedReference> {
  const basics = prepareBasics(reference, options);
  const parts = await workers.parts(sliceJob(basics, null, true));
  return { ...basics, logEnergy: parts.referenceLog! };
}

/** The four metrics from the slice parts and the whole-volume sums. */
function metricsFrom(prepared: PreparedReference, test: Volume, parts: SliceParts): VolumeMetrics {
  const reference = prepared.volume;
  const hasMask = prepared.mask !== null;
  const m = prepared.mask?.mask ?? null;
  const error = squaredError(reference.pixels, test.pixels, m);
  const ssim = combineSsim(parts.ssim!, hasMask);
  const hfen = hfenFromParts({ reference: prepared.logEnergy, difference: parts.differenceLog! }, hasMask);
  const L = prepared.dataRange;
  const result: VolumeMetrics = {
    psnr: psnrFromMse(error.sum / error.count, L),
    ssim: ssim.value,
    nrmse: nrmseFromSums(error.sum, prepared.energy.all),
    hfen: hfen.value,
    data_range: L,
    slices: reference.slices,
    data_range_source: prepared.dataRangeSource,
    shape: [reference.slices, reference.rows, reference.columns],
    mask: null,
    masked: null,
    conventions: [],
  };
  if (prepared.mask) {
    const pm = prepared.mask;
    result.mask = {
      source: pm.source,
      ...(pm.path !== undefined ? { path: pm.path } : {}),
      ...(pm.threshold !== undefined ? { threshold: pm.threshold, components: pm.components, filled: pm.filled } : {}),
      voxels: pm.voxels,
      fraction: pm.voxels / reference.pixels.length,
    };
    result.masked = {
      psnr: psnrFromMse(error.maskedSum / error.maskedCount, L),
      ssim: ssim.masked,
      nrmse: nrmseFromSums(error.maskedSum, prepared.energy.masked),
      hfen: hfen.masked!,
      voxels: pm.voxels,
      ssim_slices: ssim.maskedSlices,
    };
  }
  result.conventions = metricConventions(result);
  return result;
}

export function compareVolumes(reference: Volume, test: Volume, options: MetricOptions = {}): VolumeMetrics {
  requireSameShape(reference, test, 'test and reference differ in shape');
  return compareToReference(prepareReference(reference, options), test);
}

/**
 * compareVolumes with the costly parts of both the reference and the pair spread over worker
 * threads, in one pass over the slices.
 */
export async function compareVolumesInParallel(reference: Volume, test: Volume, options: MetricOptions, workers: MetricWorkers): Promise<VolumeMetrics> {
  requireSameShape(reference, test, 'test and reference differ in shape');
  const basics = prepareBasics(reference, options);
  const parts = await workers.parts(sliceJob(basics, test, true));
  return metricsFrom({ ...basics, logEnergy: parts.referenceLog! }, test, parts);
}

const num = (v: number): string => (Number.isFinite(v) ? Number(v.toPrecision(6)).toString() : String(v));

/** The conventions behind a result, one sentence each; printed with every report. */
export function metricConventions(r: Pick<VolumeMetrics, 'data_range' | 'data_range_source' | 'slices' | 'mask'>): string[] {
  const lines = [
    'Pixels as Veil reads them: 32-bit float, complex values as their magnitude; a 3D array is (slices, rows, columns), a 2D array one slice.',
    r.data_range_source === 'given'
      ? `Data range L = ${num(r.data_range)} (given).`
      : `Data range L = max(reference) - min(reference) over the whole volume = ${num(r.data_range)}.`,
    'PSNR = 10 log10(L^2 / MSE), MSE over all voxels; identical volumes give +inf (null in JSON).',
    `SSIM after Wang, Bovik, Sheikh & Simoncelli (2004): Gaussian window sigma ${SSIM_SIGMA}, ${SSIM_WINDOW}x${SSIM_WINDOW} ` +
      `(truncate ${SSIM_TRUNCATE}), K1 = ${SSIM_K1}, K2 = ${SSIM_K2}, population covariance; per 2D slice, averaged over the pixels ` +
      `at least ${(SSIM_WINDOW - 1) / 2} from every edge, then over ${r.slices} slice(s) - as scikit-image's structural_similarity ` +
      '(gaussian_weights=True, use_sample_covariance=False, data_range=L) computes each slice.',
    'NRMSE = ||reference - test||_2 / ||reference||_2 over all voxels.',
    `HFEN after Ravishankar & Bresler (2011) = ||LoG(reference) - LoG(test)||_2 / ||LoG(reference)||_2, LoG sigma ${HFEN_SIGMA}, ` +
      `${HFEN_SIZE}x${HFEN_SIZE}, per 2D slice, borders reflected (scipy.ndimage.gaussian_laplace, mode 'reflect').`,
  ];
  const m = r.mask;
  if (m) {
    const share = `${m.voxels} voxels (${(100 * m.fraction).toFixed(1)}%)`;
    lines.push(
      m.source === 'auto'
        ? `Foreground mask, automatic: Otsu's threshold on the reference (256 bins) = ${num(m.threshold!)}, voxels above it, ` +
            `largest face-connected component of ${m.components}, its holes filled slice by slice (${m.filled} voxels): ${share}.`
        : `Foreground mask from ${m.path}: nonzero voxels, ${share}.`,
      'Masked metrics: the same L; PSNR, NRMSE and the HFEN norms over mask voxels (the LoG still filters whole slices); ' +
        "SSIM averaged over the mask pixels of each slice's interior, then over the slices that have any.",
    );
  }
  return lines;
}

/** JSON-safe copy: +∞ and NaN become null. */
export function metricsJson(r: VolumeMetrics): Record<string, unknown> {
  return JSON.parse(JSON.stringify(r, (_k, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? null : v))) as Record<string, unknown>;
}

/** Human-readable report: values, masked values, conventions. */
export function formatVolumeMetrics(r: VolumeMetrics, referencePath: string, testPath: string): string {
  const f = (v: number | null, digits: number): string =>
    v === null ? 'n/a' : v === Infinity ? 'inf' : Number.isNaN(v) ? 'undefined' : v.toFixed(digits);
  const rows: [string, string, string][] = [
    ['PSNR (dB)', f(r.psnr, 3), r.masked ? f(r.masked.psnr, 3) : ''],
    ['SSIM', f(r.ssim, 6), r.masked ? f(r.masked.ssim, 6) : ''],
    ['NRMSE', f(r.nrmse, 6), r.masked ? f(r.masked.nrmse, 6) : ''],
    ['HFEN', f(r.hfen, 6), r.masked ? f(r.masked.hfen, 6) : ''],
  ];
  const out = [
    `Reference: ${referencePath}`,
    `Test:      ${testPath}`,
    `Shape ${shapeText({ slices: r.shape[0], rows: r.shape[1], columns: r.shape[2] })} (slices x rows x columns), data range ${num(r.data_range)}`,
    '',
    `${'metric'.padEnd(10)} ${'all voxels'.padStart(12)}${r.masked ? ` ${'foreground'.padStart(12)}` : ''}`,
    ...rows.map(([k, a, b]) => `${k.padEnd(10)} ${a.padStart(12)}${r.masked ? ` ${b.padStart(12)}` : ''}`),
    '',
    'Conventions:',
    ...r.conventions.map((c) => `  - ${c}`),
  ];
  return out.join('\n') + '\n';
}
