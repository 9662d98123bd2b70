/**
 * What `veil build` learns about the images of a study, one volume at a time: each method's
 * metrics against its case's reference (PSNR, SSIM, NRMSE, HFEN, plain and within the automatic
 * foreground mask) and the per-item statistics of the blinding-strength check. Holds only the
 * current case's prepared reference, so memory stays flat however large the study.
 */
import type { Volume } from '../images/volume.ts';
import { blindingStrength, type BlindingStrength, type ItemFeatures } from './blinding-strength.ts';
import { compareToReference, metricsJson, prepareReference, type PreparedReference } from './compare-volumes.ts';
import { itemStatistics, type ItemStatisticsOptions } from './item-statistics.ts';
import { metricRow, type MetricRow } from './linkage.ts';
import { MetricsError } from './metrics-error.ts';

export interface ItemMetrics { row: MetricRow; detail: Record<string, unknown> }

export class StudyMetrics {
  private reference: PreparedReference | null = null;
  private readonly items: ItemFeatures[] = [];
  readonly skipped: string[] = [];

  constructor(private readonly statisticsOptions: ItemStatisticsOptions) {}

  /** Starts a case; `reference` is its reference volume, or null when the case has none. */
  startCase(reference: Volume | null): void {
    this.reference = null;
    if (!reference) return;
    try {
      this.reference = prepareReference(reference, { mask: 'auto' });
    } catch (e) {
      // Metrics are a help, not a condition of building kits: say why they are missing and go on.
      if (!(e instanceof MetricsError)) throw e;
      this.skipped.push(`no metrics for ${reference.provenance.path}: ${e.message.replace(`${reference.provenance.path}: `, '')}`);
    }
  }

  /** Records a method's volume as the reader will see it; returns its metrics when there is a reference on the same grid. */
  addMethod(caseId: string, methodId: string, v: Volume): ItemMetrics | null {
    this.items.push({ case: caseId, method: methodId, stats: itemStatistics(v, this.statisticsOptions) });
    const ref = this.reference?.volume;
    if (!ref) return null;
    if (ref.rows !== v.rows || ref.columns !== v.columns || ref.slices !== v.slices) {
      this.skipped.push(`case ${caseId}: ${methodId} is ${v.slices}x${v.rows}x${v.columns}, the reference ${ref.slices}x${ref.rows}x${ref.columns}: no metrics (set display.matching: reference-grid)`);
      return null;
    }
    const result = compareToReference(this.reference!, v);
    return { row: metricRow(caseId, methodId, result), detail: metricsJson(result) };
  }

  /** The blinding-strength check over every item seen, or null with fewer than two cases. */
  blinding(seed: number): BlindingStrength | null {
    const cases = new Set(this.items.map((i) => i.case));
    const methods = new Set(this.items.map((i) => i.method));
    if (cases.size < 2 || methods.size < 2) return null;
    return blindingStrength(this.items, { seed });
  }
}
