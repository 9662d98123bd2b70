/**
 * Inter-reader agreement per (method, question), from tidy ratings.
 *
 * For every method and question the ratings form a cases × readers matrix. On its complete cases
 * (cases scored by every reader of that group) we report Fleiss' kappa (./fleiss-kappa.ts, the scores
 * taken as nominal categories) and the six Shrout & Fleiss intraclass correlations with 95% intervals
 * (./icc.ts, the scores taken as interval measurements). Both statistics use the same cases.
 *
 * The output is JSON-safe: where a statistic is undefined (one reader, fewer than two complete cases,
 * no variance) the value is null and `notes` says why.
 */
import type { TidyRow } from '../report/tidy-csv.ts';
import { fleissKappa } from './fleiss-kappa.ts';
import { ICC_FORMS, icc } from './icc.ts';
import type { IccForm, IccResult } from './icc.ts';

export interface AgreementOptions {
  /** Only this method. */
  method?: string;
  /** Only this question. */
  question?: string;
  /**
   * Likert scale per question id (as in the study template). With a scale, the kappa categories are
   * 1..points and a score outside it is an error; without, they are the scores observed.
   */
  scales?: Record<string, { points: number }>;
}

export interface IccSummary {
  value: number | null;
  /** 95% confidence interval, null where it is undefined. */
  ci95: [number, number] | null;
}

export interface AgreementGroup {
  method: string;
  question: string;
  /** Distinct cases with at least one rating. */
  cases: number;
  /** Distinct readers with at least one rating. */
  readers: number;
  /** Ratings (rows) in the group. */
  ratings: number;
  /** Cases rated by every reader; the statistics use these. */
  completeCases: number;
  fleiss: { kappa: number | null; subjects: number; categories: number[] };
  icc: Record<IccForm, IccSummary>;
  missing: 'complete cases';
  /** Why a value is null, and what was left out. */
  notes: string[];
}

const compare = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);
const finite = (v: number): number | null => (Number.isFinite(v) ? v : null);

function emptyIcc(): Record<IccForm, IccSummary> {
  return Object.fromEntries(ICC_FORMS.map((f) => [f, { value: null, ci95: null }])) as Record<IccForm, IccSummary>;
}

/** Say why ICC values or intervals came out as 0/0 or ±∞. */
function iccNotes(r: IccResult): { icc: Record<IccForm, IccSummary>; notes: string[] } {
  const { betweenCases, withinCases, residual, total } = r.anova;
  const reason = (form: IccForm): string => {
    const oneWay = form.startsWith('ICC(1');
    if (total.ss === 0) return 'every score is the same, so there is no variance to share out';
    if (betweenCases.ms === 0) return "the cases' mean scores are all equal (between-case mean square 0)";
    if (oneWay && withinCases.ms === 0) return 'each case got the same score from every reader (within-case mean square 0)';
    if (!oneWay && residual.ms === 0) return 'the scores are exactly case effect plus reader offset (residual mean square 0)';
    return 'the formula gives no finite number for these data';
  };
  const out = emptyIcc();
  const byReason = new Map<string, string[]>();
  const add = (what: string, form: IccForm): void => {
    const key = `${what}|${reason(form)}`;
    byReason.set(key, [...(byReason.get(key) ?? []), form]);
  };
  for (const form of ICC_FORMS) {
    const e = r.forms[form];
    const value = finite(e.value);
    const lo = finite(e.ci95[0]);
    const hi = finite(e.ci95[1]);
    out[form] = { value, ci95: value !== null && lo !== null && hi !== null ? [lo, hi] : null };
    if (value === null) add('undefined', form);
    else if (out[form].ci95 === null) add('95% CI undefined', form);
  }
  const notes = [...byReason].map(([key, forms]) => {
    const [what, why] = key.split('|');
    return `${forms.join(', ')} ${what}: ${why}`;
  });
  return { icc: out, notes };
}

function analyseGroup(method: string, question: string, rows: readonly TidyRow[], points?: number): AgreementGroup {
  const caseIds = [...new Set(rows.map((r) => r.case))].sort(compare);
  const readerIds = [...new Set(rows.map((r) => r.reader))].sort(compare);
  const caseIndex = new Map(caseIds.map((c, i) => [c, i]));
  const readerIndex = new Map(readerIds.map((c, i) => [c, i]));
  const matrix: (number | null)[][] = caseIds.map(() => readerIds.map(() => null));
  for (const r of rows) {
    const where = `case "${r.case}", reader "${r.reader}", method "${method}", question "${question}"`;
    if (!Number.isFinite(r.score)) throw new Error(`${where}: score ${r.score} is not a number`);
    if (points !== undefined && (!Number.isInteger(r.score) || r.score < 1 || r.score > points)) {
      throw new Error(`${where}: score ${r.score} is outside the scale 1..${points}`);
    }
    const i = caseIndex.get(r.case) as number;
    const j = readerIndex.get(r.reader) as number;
    if (matrix[i][j] !== null) throw new Error(`${where}: rated more than once`);
    matrix[i][j] = r.score;
  }
  const complete = matrix.filter((row) => row.every((v) => v !== null)).length;
  const categories = points !== undefined ? Array.from({ length: points }, (_, i) => i + 1) : null;
  const group: AgreementGroup = {
    method,
    question,
    cases: caseIds.length,
    readers: readerIds.length,
    ratings: rows.length,
    completeCases: complete,
    fleiss: { kappa: null, subjects: complete, categories: categories ?? [] },
    icc: emptyIcc(),
    missing: 'complete cases',
    notes: [],
  };
  const notes = group.notes;

  if (readerIds.length < 2) {
    notes.push(`only one reader (${readerIds[0]}): kappa and ICC need at least two readers`);
    return group;
  }
  if (complete < caseIds.length) {
    const left = caseIds.length - complete;
    notes.push(
      `${left} of ${caseIds.length} cases ${left === 1 ? 'lacks' : 'lack'} a rating from some reader and ` +
        `${left === 1 ? 'was' : 'were'} left out (complete cases)`,
    );
  }
  if (complete === 0) {
    notes.push('no case was rated by every reader: kappa and ICC undefined');
    return group;
  }

  const fk = fleissKappa(matrix, categories ?? undefined);
  if (categories === null) {
    group.fleiss.categories = [...new Set(matrix.filter((row) => row.every((v) => v !== null)).flat() as number[])].sort((a, b) => a - b);
  }
  group.fleiss.kappa = finite(fk.kappa);
  if (group.fleiss.kappa === null) {
    notes.push("Fleiss' kappa undefined: every rating falls in one category, so chance agreement is 1");
  }

  if (complete < 2) {
    notes.push('ICC undefined: it needs at least two complete cases');
    return group;
  }
  const summary = iccNotes(icc(matrix));
  group.icc = summary.icc;
  notes.push(...summary.notes);
  return group;
}

/** Agreement for every (method, question) in the rows, sorted by method then question. */
export function agreementByGroup(rows: readonly TidyRow[], opts: AgreementOptions = {}): AgreementGroup[] {
  const groups = new Map<string, { method: string; question: string; rows: TidyRow[] }>();
  for (const r of rows) {
    if (opts.method !== undefined && r.method !== opts.method) continue;
    if (opts.question !== undefined && r.question !== opts.question) continue;
    const key = JSON.stringify([r.method, r.question]);
    let g = groups.get(key);
    if (!g) {
      g = { method: r.method, question: r.question, rows: [] };
      groups.set(key, g);
    }
    g.rows.push(r);
  }
  return [...groups.values()]
    .sort((a, b) => compare(a.method, b.method) || compare(a.question, b.question))
    .map((g) => analyseGroup(g.method, g.question, g.rows, opts.scales?.[g.question]?.points));
}

const fmt = (v: number | null): string => (v === null ? 'n/a' : v.toFixed(3));

/**
 * A plain-text table for the terminal: method, question, cases, readers, Fleiss' kappa and
 * ICC(2,1) with its 95% interval, then the notes.
 */
export function formatAgreementTable(groups: readonly AgreementGroup[]): string {
  const header = ['method', 'question', 'cases', 'readers', 'Fleiss kappa', 'ICC(2,1) [95% CI]'];
  const numeric = [false, false, true, true, true, true];
  const body = groups.map((g) => {
    const i = g.icc['ICC(2,1)'];
    const ci = i.ci95 ? ` [${fmt(i.ci95[0])}, ${fmt(i.ci95[1])}]` : '';
    return [
      g.method,
      g.question,
      g.completeCases === g.cases ? String(g.cases) : `${g.completeCases}/${g.cases}`,
      String(g.readers),
      fmt(g.fleiss.kappa),
      fmt(i.value) + ci,
    ];
  });
  const widths = header.map((h, c) => Math.max(h.length, ...body.map((r) => r[c].length)));
  const render = (cells: string[]): string =>
    cells.map((s, c) => (numeric[c] ? s.padStart(widths[c]) : s.padEnd(widths[c]))).join('  ').trimEnd();
  const lines = [render(header), widths.map((w) => '-'.repeat(w)).join('  '), ...body.map(render)];
  if (groups.length === 0) lines.push('(no ratings)');
  lines.push('');
  lines.push('cases: complete cases used; n/m where only n of the m cases were rated by every reader.');
  lines.push('ICC(2,1): two-way random effects, absolute agreement, single reader (Shrout & Fleiss 1979).');
  const notes = groups.flatMap((g) => g.notes.map((n) => `  ${g.method} / ${g.question}: ${n}`));
  if (notes.length > 0) lines.push('Notes:', ...notes);
  return lines.join('\n') + '\n';
}
