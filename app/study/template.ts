/**
 * The study template (`*.study.yaml`) as Veil uses it after validation.
 * The contract lives in design.md; the JSON schema in ./schema.ts mirrors these types.
 */
export interface LikertScale {
  points: number;
  low: string;
  high: string;
}

export interface Question {
  id: string;
  text: string;
  scale: LikertScale;
  /** Optional names for individual points, keyed by point (1..points). */
  labels: Record<number, string>;
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
