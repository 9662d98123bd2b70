/**
 * The whole analysis of a study, from its inputs: comparison statistics, agreement (reusing
 * app/stats/agreement.ts), and — when the inputs carry them — metric–score linkage and the
 * blinding-strength check; then tables, figures and the methods paragraph. Pure apart from
 * rendering figures; writing files is ./write-report.ts.
 *
 * Filters (question, method, reader) restrict the ratings before everything is computed, so the
 * app's filtered view and an exported report of the same filter agree.
 */
import type { TidyRow } from './tidy-csv.ts';
import { agreementReport, DEFAULT_BOOTSTRAP_RESAMPLES } from '../stats/agreement.ts';
import { compareMethods, DEFAULT_COMPARISON_RESAMPLES } from '../stats/comparison/comparison.ts';
import { metricScoreLinkage, type LinkageReport } from '../metrics/linkage.ts';
import { RESEARCH_NOTICE, VEIL_VERSION } from '../notice.ts';
import type { AnalysisFilter, AnalysisResult, ReportTable } from './analysis-types.ts';
import type { StudyInputs } from './study-inputs.ts';
import { buildFigures } from './figures.ts';
import { methodsText } from './methods-text.ts';
import {
  agreementTable, blindingTable, descriptivesTable, designTable, distributionTable, friedmanTable, linkageTable, noninferiorityTable, pairsTable, readingTimeTable,
} from './tables.ts';

export interface BuildOptions {
  filter?: AnalysisFilter;
  /** Bootstrap resamples for comparisons and agreement (defaults 2000). */
  resamples?: number;
  /** Clock for the report's date (tests fix it). */
  now?: () => Date;
}

export const NOTICE = RESEARCH_NOTICE;

export async function buildAnalysis(inputs: StudyInputs, opts: BuildOptions = {}): Promise<AnalysisResult> {
  const filter = opts.filter ?? {};
  const all = inputs.ratings;
  const rows: TidyRow[] = all
    .filter((r) => (filter.question ? r.question === filter.question : true))
    .filter((r) => (filter.method ? r.method === filter.method : true))
    .filter((r) => (filter.reader ? r.reader === filter.reader : true))
    .map((r) => ({ ...r }));
  const d = inputs.design;
  const notes: string[] = [];
  const points = Object.fromEntries(d.questions.map((q) => [q.id, q.points]));
  const methodOrder = d.methods.map((m) => m.id);
  const comparisonResamples = opts.resamples ?? DEFAULT_COMPARISON_RESAMPLES;
  const comparison = compareMethods(rows, {
    methods: methodOrder, points, acceptable: inputs.settings.acceptable, compareTo: inputs.settings.compareTo,
    noninferiorityMargin: inputs.settings.noninferiorityMargin, seed: inputs.seed, resamples: comparisonResamples,
  });
  notes.push(...comparison.notes);

  const agreementResamples = opts.resamples ?? DEFAULT_BOOTSTRAP_RESAMPLES;
  let agreement = null;
  const readers = new Set(rows.map((r) => r.reader));
  if (readers.size >= 2) {
    agreement = agreementReport(rows, { scales: Object.fromEntries(d.questions.map((q) => [q.id, { points: q.points }])), bootstrap: agreementResamples, seed: inputs.seed });
  } else {
    notes.push('agreement needs at least two readers' + (filter.reader ? ' (a reader filter leaves one)' : ''));
  }

  let linkage: LinkageReport | null = null;
  if (inputs.metrics && inputs.metrics.length > 0) {
    linkage = metricScoreLinkage(rows, inputs.metrics, { seed: inputs.seed, resamples: opts.resamples });
  }
  const blinding = inputs.blinding;

  const tables: ReportTable[] = [designTable(d), descriptivesTable(comparison), distributionTable(comparison), pairsTable(comparison), friedmanTable(comparison)];
  const ni = noninferiorityTable(comparison);
  if (ni) tables.push(ni);
  if (agreement) tables.push(agreementTable(agreement));
  tables.push(readingTimeTable(comparison));
  if (linkage) tables.push(linkageTable(linkage));
  if (blinding) tables.push(blindingTable(blinding));

  const timed = new Map<string, { method: string; session: number; seconds: number }>();
  for (const r of rows) {
    const key = JSON.stringify([r.reader, r.case, r.method]);
    if (!timed.has(key) && typeof r.seconds === 'number' && Number.isFinite(r.seconds)) timed.set(key, { method: r.method, session: Number(r.session) || 1, seconds: r.seconds });
  }
  const figures = await buildFigures({
    comparison, points: Math.max(2, ...d.questions.filter((q) => !filter.question || q.id === filter.question).map((q) => q.points)),
    agreement, linkage, timedItems: [...timed.values()],
  });

  const text = methodsText({
    product: 'Veil', version: VEIL_VERSION, readers: readers.size, cases: new Set(rows.map((r) => r.case)).size, methods: comparison.methods.length,
    settings: inputs.settings, comparison, agreement: agreement !== null, agreementResamples, linkage: linkage !== null, blinding: blinding !== null,
  });
  const simulated = rows.filter((r) => (r as { source?: unknown }).source === 'simulated').length;
  if (simulated > 0) notes.push(`${simulated} of ${rows.length} ratings come from simulated readers (demo data), not people`);

  return {
    product: 'Veil', version: VEIL_VERSION, generatedAt: (opts.now ?? (() => new Date()))().toISOString(),
    design: d, settings: inputs.settings, filter,
    choices: {
      questions: d.questions.map((q) => q.id), methods: methodOrder, readers: d.readers,
    },
    ratings: rows.length, simulated, tables, figures,
    methodsText: [text.paragraph, '', 'References', ...text.references].join('\n'),
    sections: { metrics: linkage !== null, linkage: linkage !== null, blinding: blinding !== null },
    notes, comparison, agreement,
  };
}
