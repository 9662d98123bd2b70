/**
 * The operations every host exposes (Electron IPC, localhost HTTP), as plain JSON-safe values.
 * This file holds only names and types, so the preload script and the renderer can import it
 * without pulling in Node modules. The implementation is in ./api.ts.
 */
export interface AppInfo {
  product: 'Veil';
  version: string;
  notice: string;
  /** 'study': a study folder with one kit per reader; 'kit': one reader's kit. */
  mode: 'study' | 'kit';
  title: string;
}

export interface Progress {
  answered: number;
  total: number;
  /** Index (0-based, in reading order) of the first item without a complete answer; null when done. */
  next: number | null;
}

export interface ReaderEntry {
  reader: string;
  items: number;
  answered: number;
}

export interface KitQuestionView {
  id: string;
  text: string;
  /** likert: 1..points from low to high; yes-no: 1 = no, 2 = yes; comparative: 1 = low end (left) .. points = high end (right), middle = no difference. */
  type: 'likert' | 'yes-no' | 'comparative';
  points: number;
  low: string;
  high: string;
  labels: Record<string, string>;
  required: boolean;
  /** The reader may add a free-text comment. */
  comment: boolean;
}

/** A named window in the kit's display units. */
export interface WindowPreset { name: string; center: number; width: number }

export type FlagReason = 'does-not-load' | 'unrelated-artifact' | 'other';

export interface ItemFlag { reason: FlagReason; note: string }

export interface SessionState {
  session: number;
  items: number;
  answered: number;
  /** When its last item was saved: from then on its answers are final. */
  completedAt: string | null;
  /** End of the washout after the previous session (set once that session is complete). */
  opensAt: string | null;
  /** Whether its items can be answered now. */
  open: boolean;
}

/** Geometry and default window of one image of an item. */
export interface KitImageView {
  columns: number;
  rows: number;
  slices: number;
  spacing: [number, number, number];
  window: { center: number; width: number };
}

export interface KitItemView {
  id: string;
  session: number;
  /** One view for single presentation; two (left, right) for side-by-side. */
  views: KitImageView[];
  /** A calibration item: its intended scores and what the reader should see; left out of the analysis. */
  calibration?: { scores: Record<string, number>; note: string };
}

export interface KitView {
  kitId: string;
  reader: string;
  title: string;
  sessions: number;
  washoutDays: number;
  /** Whether the reader may go back to earlier items of the current session and change answers. */
  revisits: boolean;
  presets: WindowPreset[];
  questions: KitQuestionView[];
  items: KitItemView[];
  /** Latest score per item and question. */
  answers: Record<string, Record<string, number>>;
  /** Latest comment per item and question. */
  comments: Record<string, Record<string, string>>;
  /** Flag of each flagged item. */
  flags: Record<string, ItemFlag>;
  /** Ids of saved items. */
  submitted: string[];
  sessionStates: SessionState[];
  /** The reader's last answer to the display check; null before the first. */
  displayCheck: { seen: boolean; at: string } | null;
  /** The host's clock, so that lock dates are judged by one clock. */
  now: string;
  progress: Progress;
}

export interface SubmitRequest {
  reader: string;
  itemId: string;
  scores: Record<string, number>;
  /** Active seconds spent on the item. */
  seconds: number | null;
  /** Comments by question (questions with `comment`); '' clears one. */
  comments?: Record<string, string>;
  /** A flag on the item; with 'does-not-load' the required questions may stay unanswered. */
  flag?: ItemFlag | null;
}

export interface SubmitResult {
  progress: Progress;
  sessionStates: SessionState[];
}

export interface VeilApi extends CoordinatorApi, AnalysisApi {
  info(): Promise<AppInfo>;
  listReaders(): Promise<ReaderEntry[]>;
  openKit(req: { reader: string }): Promise<KitView>;
  /** Display pixels of one view of an item (default 0): little-endian uint16, slice-major (slice, row, column). */
  itemPixels(req: { reader: string; itemId: string; view?: number }): Promise<ArrayBuffer>;
  /** Resolves only once the answer is durable on disk. */
  submitAnswer(req: SubmitRequest): Promise<SubmitResult>;
  /** Records the reader's answer to the display check shown before the first session. */
  confirmDisplayCheck(req: { reader: string; seen: boolean }): Promise<{ at: string }>;
  /** Writes a results bundle of every answer so far into the kit's results/ folder and returns its path. */
  exportResults(req: { reader: string }): Promise<{ file: string }>;
  /** Agreement of the collected answers (study folder only), as `veil agreement --json`; bootstrap seed defaults to the study's. */
  agreement(req?: AgreementRequest): Promise<import('./stats/agreement-types.ts').AgreementReport & { seedFrom: 'study' | 'request' }>;
}

export const COORDINATOR_OPERATIONS = ['studyOverview', 'checkTemplate', 'startBuild', 'job', 'cancelJob', 'collect'] as const satisfies readonly (keyof CoordinatorApi)[];

// ---- Analysis (study folders only): the report's tables and figures, and exporting the report ----
export type { AnalysisFilter, AnalysisResult, ReportFigure, ReportTable } from './report/analysis-types.ts';
export interface AnalysisApi {
  /** The analysis of the served study (tables, figure SVGs, methods text), restricted by the filter. */
  analysis(req: import('./report/analysis-types.ts').AnalysisFilter): Promise<import('./report/analysis-types.ts').AnalysisResult>;
  /** Writes the report folder (CSV, Markdown, LaTeX, SVG/PNG, HTML) and returns its path. */
  exportReport(req: { out: string; filter?: import('./report/analysis-types.ts').AnalysisFilter }): Promise<{ dir: string; files: string[] }>;
}
export const ANALYSIS_OPERATIONS = ['analysis', 'exportReport'] as const satisfies readonly (keyof AnalysisApi)[];

// ---- Agreement (study folders only): every agreement statistic per method and question ----
export type { AgreementGroupJson, AgreementReport, CoefficientEstimate, Estimate } from './stats/agreement-types.ts';
export interface AgreementRequest { question?: string; method?: string; bootstrap?: number; seed?: number }

export type OperationName = keyof VeilApi;

export const OPERATIONS: readonly OperationName[] = ['info', 'listReaders', 'openKit', 'itemPixels', 'submitAnswer', 'exportResults', 'confirmDisplayCheck', 'agreement', ...COORDINATOR_OPERATIONS, ...ANALYSIS_OPERATIONS] as const;

/** An error meant for the user: bad input or a refused action, with a message naming what and where. */
export class ApiError extends Error {
  constructor(message: string, public readonly status = 400) {
    super(message);
    this.name = 'ApiError';
  }
}

// ---- Coordinator side (study folders only; a kit holds no key) ----

export interface JobView {
  id: string;
  kind: string;
  state: 'running' | 'done' | 'failed' | 'cancelled';
  progress: { done: number; total: number; what: string };
  result?: unknown;
  error?: string;
}

export interface ReaderProgress {
  reader: string;
  kitId: string;
  kitPath: string;
  items: number;
  sessions: number;
  /** Items with at least one answer, from collected bundles (or simulated answers). */
  answered: number;
  sessionsDone: number;
  medianSeconds: number | null;
  lastActivity: string | null;
  bundles: number;
  simulated: boolean;
}

export interface StudyOverview {
  title: string;
  seed: number;
  generator: string;
  createdAt: string;
  design: unknown;
  readers: ReaderProgress[];
}

export interface CollectResultView {
  file: string;
  status: 'imported' | 'updated' | 'unchanged' | 'refused' | 'conflict';
  reader?: string;
  added: number;
  reason?: string;
}

/** What the coordinator's screen shows of `veil check` (the JSON of `veil check --json`, in part). */
export interface CheckView {
  ok: boolean;
  title: string;
  sources: { case: string; source: string; path: string; format?: string; shape?: number[]; spacing?: number[]; dataType?: string; range?: number[]; error?: string }[];
  problems: { message: string }[];
  warnings: { kind: string; message: string }[];
  blinding: { accuracy: number; chance: number; pValue: number; warning: string | null } | null;
}

export interface BuildRequest {
  /** Path of the study template on the host's machine. */
  template: string;
  /** Folder to create the study in (workspace.sqlite and kits/). */
  out: string;
  /** Also write each kit as kits/<reader>.zip for transfer. */
  zip?: boolean;
}

/** The coordinator's operations. They refuse in kit mode: a kit holds no key. */
export interface CoordinatorApi {
  /** Kits and every reader's progress, from the workspace of the served study folder. */
  studyOverview(): Promise<StudyOverview>;
  /** `veil check` for a template on the host's machine: the case x method table, problems and warnings. */
  checkTemplate(req: { template: string }): Promise<CheckView>;
  /** Starts building a study from a template; poll `job` for progress. */
  startBuild(req: BuildRequest): Promise<JobView>;
  job(req: { id: string }): Promise<JobView>;
  cancelJob(req: { id: string }): Promise<JobView>;
  /** Verifies results bundles (given as file name and text) and unblinds them into the served study's workspace. */
  collect(req: { bundles: { name: string; text: string }[] }): Promise<CollectResultView[]>;
}

