/**
 * The JSON shape of an analysis (what `veil report` writes as analysis.json and the API's
 * `analysis` operation returns). Types only, so that app/api-contract.ts can re-export them to
 * the renderer.
 */
import type { AgreementReport } from '../stats/agreement-types.ts';
import type { ComparisonReport } from '../stats/comparison/comparison-types.ts';

export type Cell = string | number | null;

/** A summary table: written as CSV, Markdown and LaTeX, and shown in the HTML report and the app. */
export interface ReportTable {
  /** File stem, e.g. "descriptives". */
  id: string;
  title: string;
  columns: string[];
  /** Columns holding numbers (right-aligned). */
  numeric: boolean[];
  rows: Cell[][];
  caption: string;
}

export interface ReportFigure {
  id: string;
  title: string;
  caption: string;
  svg: string;
}

export interface DesignSection {
  title: string;
  seed: number | null;
  generator: string | null;
  presentation: string | null;
  sessions: number | null;
  washoutDays: number | null;
  readers: string[];
  cases: number;
  methods: { id: string; label: string }[];
  questions: { id: string; text: string; points: number }[];
  /** Balance lines (methods per session, mean place in session). */
  balance: string[];
}

export interface AnalysisSettings {
  acceptable: number;
  compareTo: string | null;
  noninferiorityMargin: number | null;
}

export interface AnalysisFilter {
  question?: string;
  method?: string;
  reader?: string;
}

export interface AnalysisResult {
  product: string;
  version: string;
  generatedAt: string;
  design: DesignSection;
  settings: AnalysisSettings;
  filter: AnalysisFilter;
  /** What each filter can take. */
  choices: { questions: string[]; methods: string[]; readers: string[] };
  ratings: number;
  simulated: number;
  tables: ReportTable[];
  figures: ReportFigure[];
  methodsText: string;
  /** Which optional sections are present. */
  sections: { metrics: boolean; linkage: boolean; blinding: boolean };
  notes: string[];
  comparison: ComparisonReport;
  agreement: AgreementReport | null;
}
