/**
 * What `veil build` learns about the images of one case: each method's metrics against the
 * case's reference (PSNR, SSIM, NRMSE, HFEN, plain and within the automatic foreground mask) and
 * the per-item statistics of the blinding-strength check. One case at a time, so memory stays flat
 * however large the study; `studyBlinding` then runs the check over the items of every case.
 */
import type { Volume } from '../images/volume.ts';
import { blindingStrength, type BlindingStrength, type ItemFeatures } from './blinding-strength.ts';
import { compareToReference, metricsJson, prepareReference, type PreparedReference } from './compare-volumes.ts';
import { itemStatistics, type ItemStatistics, type ItemStatisticsOptions } from './item-statistics.ts';
import { metricRow, type MetricRow } from './linkage.ts';
import { MetricsError } from './metrics-error.ts';

export interface ItemMetrics { row: MetricRow; detail: Record<string, unknown> }

export class CaseMetrics {
  private readonly reference: PreparedReference | null = null;
  /** Why some items have no metrics, one line each. */
  readonly skipped: string[] = [];

  /** `reference`: the case's reference volume, or null when the case has none. */
  constructor(private readonly caseId: string, reference: Volume | null, private readonly statisticsOptions: ItemStatisticsOptions) {
    if (!reference) return;
    try {
      this.reference = prepareReference(reference, { mask: 'auto' });
    } catch (e) {
      // Metrics are a help, not a condition of building kits: say why they are missing and go on.
      if (!(e instanceof MetricsError)) throw e;
      this.skipped.push(`no metrics for ${reference.provenance.path}: ${e.message.replace(`${reference.provenance.path}: `, '')}`);
    }
  }

  /** A method's volume as the reader will see it: its statistics, and its metrics when there is a reference on the same grid. */
  addMethod(methodId: string, v: Volume): { stats: ItemStatistics; metrics: ItemMetrics | null } {
    const stats = itemStatistics(v, this.statisticsOptions);
    const ref = this.reference?.volume;
    if (!ref) return { stats, metrics: null };
    if (ref.rows !== v.rows || ref.columns !== v.columns || ref.slices !== v.slices) {
      this.skipped.push(`case ${this.caseId}: ${methodId} is ${v.slices}x${v.rows}x${v.columns}, the reference ${ref.slices}x${ref.rows}x${ref.columns}: no metrics (set display.matching: reference-grid)`);
      return { stats, metrics: null };
    }
    const result = compareToReference(this.reference!, v);
    return { stats, metrics: { row: metricRow(this.caseId, methodId, result), detail: metricsJson(result) } };
  }
}

/** The blinding-strength check over the items of every case, or null with fewer than two cases or methods. */
export function studyBlinding(items: readonly ItemFeatures[], seed: number): BlindingStrength | null {
  const cases = new Set(items.map((i) => i.case));
  const methods = new Set(items.map((i) => i.method));
  if (cases.size < 2 || methods.size < 2) return null;
  return blindingStrength(items, { seed });
}
