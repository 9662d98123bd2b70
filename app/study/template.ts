/**
 * The study template (`*.study.yaml`) as Veil uses it after validation.
 * The contract lives in design.md; the JSON schema in ./schema.ts mirrors these types.
 */
export interface LikertScale {
  points: number;
  low: string;
  high: string;
}

export type QuestionType = 'likert' | 'yes-no' | 'comparative';

export interface Question {
  id: string;
  text: string;
  /**
   * A yes-no question gets the scale {points: 2, low: No, high: Yes} (scored 1 = no, 2 = yes).
   * A comparative question (side-by-side only) has an odd number of points, symmetric about the
   * middle one (no difference); `low` names the left end, `high` the right end.
   */
  scale: LikertScale;
  /** Optional names for individual points, keyed by point (1..points). */
  labels: Record<number, string>;
  /** Present only when the template says; absent means likert. */
  type?: QuestionType;
  /** Present only when the template says; absent means required. */
  required?: boolean;
  /** Present only when the template says; true offers an optional free-text comment. */
  comment?: boolean;
}

export interface MethodSpec {
  id: string;
  /** Coordinator-only; never written to a kit. */
  label: string;
  /** Path pattern relative to `sources`, with `{case}` standing for the case folder name. */
  path: string;
}

export interface DesignSpec {
  presentation: 'single' | 'side-by-side';
  sessions: number;
  washout_days: number;
  /** Present only when the template says; true lets a reader change answers of the current session. */
  revisits?: boolean;
}

/**
 * How images are prepared for readers (design.md, "Display policy"). `matching`: 'reference-grid'
 * resamples every method in-plane (linear interpolation) onto the reference's rows and columns
 * (the first method's without a reference). `intensity`: 'none' shows every method of a case in
 * the reference's window; 'percentile' scales each image from its own low to high percentile;
 * 'match-reference' maps each method onto the reference by a least-squares line first.
 */
export interface DisplaySpec {
  matching: 'none' | 'reference-grid';
  intensity: 'none' | 'percentile' | 'match-reference';
  /** Low and high percentile (0-100) of the display window. */
  percentiles: [number, number];
  /** Window presets for readers, low and high in percent of the default window (0 black, 100 white). */
  presets: { name: string; low: number; high: number }[];
}

export const DEFAULT_DISPLAY: DisplaySpec = { matching: 'none', intensity: 'percentile', percentiles: [0, 99.5], presets: [] };

/** The template's display policy, with the defaults where it has no `display` section. */
export function displayPolicy(t: Pick<StudyTemplate, 'display'>): DisplaySpec {
  const d = t.display ?? DEFAULT_DISPLAY;
  return { matching: d.matching, intensity: d.intensity, percentiles: [d.percentiles[0], d.percentiles[1]], presets: d.presets ?? [] };
}

export interface BurnedInRegion { x: number; y: number; width: number; height: number }

export interface BurnedInSpec {
  /** when-stated: only sources whose BurnedInAnnotation is YES; always; never (checked by the coordinator). */
  apply: 'when-stated' | 'always' | 'never';
  regions: BurnedInRegion[];
}

/** An item every reader reads first, with its intended scores shown; left out of the analysis. */
export interface CalibrationItem {
  /** Absolute path of the image (file or DICOM folder). */
  path: string;
  scores: Record<string, number>;
  note: string;
}

export interface StudyTemplate {
  /** Absolute path of the template file. */
  file: string;
  title: string;
  seed: number;
  /** Absolute path of the base folder of the sources. */
  sources: string;
  reference?: string;
  methods: MethodSpec[];
  /** 'auto' or explicit case folder names. */
  cases: 'auto' | string[];
  questions: Question[];
  readers: string[];
  design: DesignSpec;
  /** Present only when the template has a `display` section; read it through displayPolicy(). */
  display?: DisplaySpec;
  /** Present only when the template has a `burned_in` section. */
  burned_in?: BurnedInSpec;
  /** Calibration items (empty when the template has none). */
  calibration: CalibrationItem[];
}

/** One problem found in a template: always names the file, and the line and key where known. */
export interface TemplateIssue {
  file: string;
  line: number | null;
  column: number | null;
  /** Dotted path to the key, e.g. `questions[0].scale.points`. Empty for the whole document. */
  key: string;
  message: string;
}

export class TemplateError extends Error {
  constructor(public readonly issues: TemplateIssue[]) {
    super(issues.map(formatTemplateIssue).join('\n'));
    this.name = 'TemplateError';
  }
}

export function formatTemplateIssue(i: TemplateIssue): string {
  const where = i.line != null ? `${i.file}:${i.line}${i.column != null ? `:${i.column}` : ''}` : i.file;
  return `${where}: ${i.key ? `${i.key}: ` : ''}${i.message}`;
}
