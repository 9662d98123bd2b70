/**
 * One case's images for the kits: every source read, put on the case's grid and through the
 * display policy (design.md, "Display policy"), measured (metrics against the reference and the
 * statistics of the blinding-strength check, ../metrics/case-metrics.ts) and encoded as the uint16
 * .npy bytes a kit holds. It touches no database and no kit folder, so it runs the same in a
 * build worker thread (./build-workers.ts) or in the build's own thread; each image is handed on
 * as soon as it is made, so a case's volumes are never all in memory at once.
 */
import type { BurnedInSpec, DisplaySpec } from '../study/template.ts';
import { loadVolume } from '../images/load.ts';
import { resampleInPlane } from '../images/resample.ts';
import { writeNpy } from '../images/npy.ts';
import type { Volume } from '../images/volume.ts';
import { CaseMetrics, type ItemMetrics } from '../metrics/case-metrics.ts';
import type { SeriesRecord } from '../store/workspace.ts';
import type { ItemStatistics } from '../metrics/item-statistics.ts';
import { BuildError } from './build-error.ts';
import { blackOut, burnedInDecision } from './burned-in.ts';
import { displayMapFor, percentileWindow, toDisplayUint16, type DisplayAnchor } from './display-scale.ts';
import { sha256Hex } from './kit-integrity.ts';

export interface CaseJob {
  caseId: string;
  /** Source paths: the reference (or null) and each method, in the template's order. */
  reference: string | null;
  methods: { id: string; path: string }[];
  display: Omit<DisplaySpec, 'presets'>;
  burnedIn: BurnedInSpec | undefined;
}


export interface KitImage {
  /** The uint16 display image as .npy bytes, and their SHA-256. */
  bytes: Uint8Array;
  sha256: string;
  columns: number;
  rows: number;
  slices: number;
  spacing: Volume['spacing'];
  window: { center: number; width: number };
}

export type CaseImage =
  | { kind: 'reference'; caseId: string; series: SeriesRecord }
  | { kind: 'method'; caseId: string; methodId: string; series: SeriesRecord; image: KitImage; stats: ItemStatistics; metrics: ItemMetrics | null };

export interface CaseDone {
  caseId: string;
  /** Items without metrics, and why. */
  metricNotes: string[];
  /** The most bytes of pixels held at once while the case was made (for sizing parallel work). */
  peakBytes: number;
}

const seriesOf = (v: Volume): SeriesRecord => ({ provenance: v.provenance, columns: v.columns, rows: v.rows, slices: v.slices, spacing: v.spacing });

/**
 * Why a method cannot be shown on the case's grid (the reference's, else the first method's), or
 * null. A different slice count is always refused; a different matrix only with a reference and
 * `display.matching: none` (without a reference, each method keeps its matrix; `veil check` warns).
 */
function gridMismatch(grid: Volume, v: Volume, display: CaseJob['display'], hasReference: boolean): string | null {
  const shapes = `is ${v.slices}x${v.rows}x${v.columns} but ${grid.provenance.path} is ${grid.slices}x${grid.rows}x${grid.columns} (slices x rows x columns)`;
  if (v.slices !== grid.slices) return `${shapes}; every method of a case must have the same slices`;
  if ((v.rows !== grid.rows || v.columns !== grid.columns) && display.matching === 'none' && hasReference) {
    return `${shapes}; set display: {matching: reference-grid} in the template to resample every method to the reference's matrix`;
  }
  return null;
}

/** Makes one case's images, handing each to `emit` (awaited, so a slow consumer holds the work back). */
export async function makeCaseImages(job: CaseJob, emit: (image: CaseImage) => void | Promise<void>, signal?: AbortSignal): Promise<CaseDone> {
  const { caseId, display } = job;
  let grid: Volume | null = null;
  let anchor: DisplayAnchor | null = null;
  let peakBytes = 0;
  let ref: Volume | null = null;
  if (job.reference) {
    ref = await loadVolume(job.reference);
    grid = ref;
    anchor = { bounds: percentileWindow(ref.pixels, display.percentiles), pixels: display.intensity === 'match-reference' ? ref.pixels : null };
    await emit({ kind: 'reference', caseId, series: seriesOf(ref) });
  }
  const metrics = new CaseMetrics(caseId, ref, { percentiles: display.percentiles, includeScale: display.intensity === 'none' });
  for (const { id: methodId, path } of job.methods) {
    signal?.throwIfAborted();
    const source = await loadVolume(path);
    const mismatch = grid && gridMismatch(grid, source, display, !!job.reference);
    if (mismatch) throw new BuildError([`case ${caseId}: ${methodId} (${source.provenance.path}) ${mismatch}`]);
    grid ??= source;
    // The display policy: the common grid first, then the intensity mapping.
    const v = display.matching === 'reference-grid' ? resampleInPlane(source, grid.rows, grid.columns) : source;
    anchor ??= { bounds: percentileWindow(v.pixels, display.percentiles), pixels: null };
    const { stats, metrics: m } = metrics.addMethod(methodId, v);
    const shown = toDisplayUint16(v.pixels, displayMapFor(display.intensity, display.percentiles, v.pixels, anchor));
    // Held at once: the reference, the source, its resampled copy, the display image and its bytes.
    peakBytes = Math.max(peakBytes,
      (ref?.pixels.byteLength ?? 0) + source.pixels.byteLength + (v === source ? 0 : v.pixels.byteLength) + 2 * shown.data.byteLength);
    const burned = burnedInDecision(job.burnedIn, !!source.burnedIn, `case ${caseId}: ${methodId} (${source.provenance.path})`);
    if (burned.problem) throw new BuildError([burned.problem]);
    if (burned.apply) blackOut(shown.data, v.rows, v.columns, v.slices, job.burnedIn!);
    const bytes = writeNpy(shown.data, v.slices === 1 ? [v.rows, v.columns] : [v.slices, v.rows, v.columns]);
    await emit({
      kind: 'method', caseId, methodId, series: seriesOf(source), stats, metrics: m,
      image: { bytes, sha256: sha256Hex(bytes), columns: v.columns, rows: v.rows, slices: v.slices, spacing: v.spacing, window: shown.window },
    });
  }
  return { caseId, metricNotes: metrics.skipped, peakBytes };
}
