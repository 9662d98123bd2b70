/**
 * Inter-reader agreement per (method, question), and pooled over methods, from tidy ratings.
 *
 * For every method and question the ratings form a cases × readers matrix (./rating-matrix.ts);
 * pooled over methods ("method": "*") each (case, method) image is one subject. On it we compute,
 * each in its own module with its formula and reference:
 *   - the six Shrout & Fleiss ICCs with F-based intervals and the ANOVA table (./icc.ts)
 *   - Fleiss' kappa with a bootstrap interval (./fleiss-kappa.ts, ./bootstrap.ts)
 *   - Krippendorff's alpha, nominal, ordinal and interval, bootstrap intervals (./krippendorff-alpha.ts)
 *   - Kendall's W with its chi-square test (./kendall-w.ts)
 *   - Gwet's AC1 and AC2 with quadratic weights (./gwet-ac.ts)
 *   - percent agreement, exact and within one point (./percent-agreement.ts)
 *   - Cohen's kappa for every reader pair, unweighted, linear, quadratic (./cohen-kappa.ts), and
 *     their mean, Light's kappa (./light-kappa.ts)
 *   - a Landis & Koch word for the kappa-type values, flagged as a convention (./landis-koch.ts)
 *
 * Missing ratings are treated as each method defines (MISSING below) and every group says, per
 * statistic, how many cases and readers it used. Score categories are the question's scale when
 * one is given (then a score outside it is an error), else the scores observed in the group.
 *
 * Both bootstrap statistics of a group resample the same cases, drawn from the MT19937 stream
 * `streamFor(seed, 'agreement-bootstrap', JSON.stringify([method, question]))`, so a group's
 * interval does not depend on which other groups are computed.
 *
 * The output is JSON-safe: an undefined value is null and `notes` say why.
 */
import type { TidyRowInput } from '../report/tidy-csv.ts';
import { streamFor } from '../blinding/streams.ts';
import type {
  AgreementGroupJson, AgreementReport, AnovaLineJson, CoefficientEstimate, CohenPairJson, IccEstimateJson, IccFormName,
  StatisticName, UsedJson,
} from './agreement-types.ts';
import { caseBootstrap, percentileInterval } from './bootstrap.ts';
import { KAPPA_WEIGHTINGS, categoryIndices, cohenKappaFromTable, crossTableOfIndices, kappaWeights, type KappaWeighting } from './cohen-kappa.ts';
import { fleissKappaWeighted, weightedFleissKappa } from './fleiss-kappa.ts';
import { gwetAc1, gwetAc2Quadratic, type GwetAc } from './gwet-ac.ts';
import { ICC_FORMS, icc, type AnovaLine, type IccResult } from './icc.ts';
import { kendallW } from './kendall-w.ts';
import { ALPHA_LEVELS, krippendorffAlpha, weightedAlpha } from './krippendorff-alpha.ts';
import { INTERPRETATION_CONVENTION, landisKoch } from './landis-koch.ts';
import { lightKappa } from './light-kappa.ts';
import { percentAgreement } from './percent-agreement.ts';
import { categoryCounts, completeRowsOf, completeSubjects, distinctPatterns, observedCategories, type RatingMatrix } from './rating-matrix.ts';

export { DEFAULT_BOOTSTRAP_RESAMPLES, DEFAULT_BOOTSTRAP_SEED } from './bootstrap.ts';
import { DEFAULT_BOOTSTRAP_RESAMPLES, DEFAULT_BOOTSTRAP_SEED } from './bootstrap.ts';
export const POOLED = '*';

export interface AgreementOptions {
  /** Only this method (then no pooled groups). */
  method?: string;
  /** Only this question. */
  question?: string;
  /** Likert scale per question id: categories 1..points; a score outside it is an error. */
  scales?: Record<string, { points: number }>;
  /** Bootstrap resamples for Fleiss' kappa and Krippendorff's alpha; 0 for none. */
  bootstrap?: number;
  seed?: number;
}

/** How each statistic treats missing ratings. */
export const MISSING: Record<StatisticName, string> = {
  icc: 'complete cases: only cases scored by every reader of the group',
  fleiss_kappa: 'complete cases: only cases scored by every reader of the group',
  krippendorff_alpha: 'native: every case scored by at least two readers; absent readers are left out of that case',
  kendall_w: 'complete cases: only cases scored by every reader of the group',
  gwet: 'all ratings: cases with one rating enter chance agreement only (Gwet 2014)',
  percent_agreement: 'cases scored by at least two readers; pairs among the readers who scored each case',
  cohen_pairs: 'pairwise: each pair of readers on the cases both scored',
  light_kappa: 'pairwise, as the Cohen pairs it averages',
};

const compare = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);
const finite = (v: number): number | null => (Number.isFinite(v) ? v : null);

function coefficient(value: number, ci95: [number, number] | null, se: number | null): CoefficientEstimate {
  const v = finite(value);
  const ci = v !== null && ci95 && Number.isFinite(ci95[0]) && Number.isFinite(ci95[1]) ? ci95 : null;
  return { value: v, ci95: ci, se: v !== null && se !== null ? finite(se) : null, interpretation: landisKoch(v) };
}

const EMPTY: CoefficientEstimate = { value: null, ci95: null, se: null, interpretation: null };

function emptyIcc(): Record<IccFormName, IccEstimateJson> {
  return Object.fromEntries(ICC_FORMS.map((f) => [f, { value: null, ci95: null, F: null, df1: null, df2: null, p: null }])) as Record<
    IccFormName,
    IccEstimateJson
  >;
}

function anovaLine(l: AnovaLine): AnovaLineJson {
  return { df: l.df, ss: l.ss, ms: finite(l.ms) };
}

/** ICC values and intervals as JSON; says why a value or interval came out as 0/0 or ±∞. */
function iccJson(r: IccResult): { icc: Record<IccFormName, IccEstimateJson>; notes: string[] } {
  const { betweenCases, withinCases, residual, total } = r.anova;
  const reason = (form: IccFormName): string => {
    const oneWay = form.startsWith('ICC(1');
    if (total.ss === 0) return 'every score is the same, so there is no variance to share out';
    if (betweenCases.ms === 0) return "the cases' mean scores are all equal (between-case mean square 0)";
    if (oneWay && withinCases.ms === 0) return 'each case got the same score from every reader (within-case mean square 0)';
    if (!oneWay && residual.ms === 0) return 'the scores are exactly case effect plus reader offset (residual mean square 0)';
    return 'the formula gives no finite number for these data';
  };
  const out = emptyIcc();
  const byReason = new Map<string, string[]>();
  const add = (what: string, form: IccFormName): void => {
    const key = `${what}|${reason(form)}`;
    byReason.set(key, [...(byReason.get(key) ?? []), form]);
  };
  for (const form of ICC_FORMS) {
    const e = r.forms[form];
    const value = finite(e.value);
    const lo = finite(e.ci95[0]);
    const hi = finite(e.ci95[1]);
    out[form] = {
      value,
      ci95: value !== null && lo !== null && hi !== null ? [lo, hi] : null,
      F: finite(e.F),
      df1: e.df1,
      df2: e.df2,
      p: finite(e.p),
    };
    if (value === null) add('undefined', form);
    else if (out[form].ci95 === null) add('95% CI undefined', form);
  }
  const notes = [...byReason].map(([key, forms]) => {
    const [what, why] = key.split('|');
    return `${forms.join(', ')} ${what}: ${why}`;
  });
  return { icc: out, notes };
}

interface GroupInput {
  method: string;
  question: string;
  pooled: boolean;
  rows: TidyRowInput[];
}

interface Settings {
  points?: number;
  resamples: number;
  seed: number;
}

/** The subjects × readers matrix of a group, checking scale and duplicates. */
const where = (r: TidyRowInput): string => `case "${r.case}", reader "${r.reader}", method "${r.method}", question "${r.question}"`;

function buildMatrix(g: GroupInput, points?: number): { matrix: RatingMatrix; subjects: string[]; readers: string[] } {
  const keys = g.rows.map((r) => (g.pooled ? `${r.case}\u0000${r.method}` : r.case));
  const subjects = [...new Set(keys)].sort(compare);
  const readers = [...new Set(g.rows.map((r) => r.reader))].sort(compare);
  const subjectIndex = new Map(subjects.map((c, i) => [c, i]));
  const readerIndex = new Map(readers.map((c, i) => [c, i]));
  const values = new Float64Array(subjects.length * readers.length).fill(Number.NaN);
  for (let i = 0; i < g.rows.length; i++) {
    const r = g.rows[i];
    if (!Number.isFinite(r.score)) throw new Error(`${where(r)}: score ${r.score} is not a number`);
    if (points !== undefined && (!Number.isInteger(r.score) || r.score < 1 || r.score > points)) {
      throw new Error(`${where(r)}: score ${r.score} is outside the scale 1..${points}`);
    }
    const k = (subjectIndex.get(keys[i]) as number) * readers.length + (readerIndex.get(r.reader) as number);
    if (!Number.isNaN(values[k])) throw new Error(`${where(r)}: rated more than once`);
    values[k] = r.score;
  }
  return { matrix: { subjects: subjects.length, readers: readers.length, values }, subjects, readers };
}

function analyseGroup(g: GroupInput, s: Settings): AgreementGroupJson {
  const { matrix, readers } = buildMatrix(g, s.points);
  const m = readers.length;
  const categories = s.points !== undefined ? Array.from({ length: s.points }, (_, i) => i + 1) : observedCategories(matrix);
  const complete = completeSubjects(matrix);
  const cc = categoryCounts(matrix, categories);
  let twoOrMore = 0;
  for (let i = 0; i < cc.subjects; i++) if (cc.rated[i] >= 2) twoOrMore++;
  const used = (cases: number, stat: StatisticName): UsedJson => ({ cases, readers: m, missing: MISSING[stat] });

  const group: AgreementGroupJson = {
    method: g.method,
    question: g.question,
    subject: g.pooled ? 'case x method' : 'case',
    cases: matrix.subjects,
    readers: m,
    ratings: g.rows.length,
    categories,
    categories_from: s.points !== undefined ? 'scale' : 'observed',
    icc: emptyIcc(),
    icc_anova: null,
    fleiss_kappa: EMPTY,
    krippendorff_alpha: { nominal: EMPTY, ordinal: EMPTY, interval: EMPTY },
    kendall_w: { value: null, chi2: null, df: null, p: null },
    gwet: { ac1: EMPTY, ac2_quadratic: EMPTY },
    percent_agreement: { exact: null, within_one: null },
    cohen_pairs: [],
    light_kappa: { unweighted: EMPTY, linear: EMPTY, quadratic: EMPTY, pairs: 0 },
    used: {
      icc: used(complete.length, 'icc'),
      fleiss_kappa: used(complete.length, 'fleiss_kappa'),
      krippendorff_alpha: used(twoOrMore, 'krippendorff_alpha'),
      kendall_w: used(complete.length, 'kendall_w'),
      gwet: used(matrix.subjects, 'gwet'),
      percent_agreement: used(twoOrMore, 'percent_agreement'),
      cohen_pairs: used(twoOrMore, 'cohen_pairs'),
      light_kappa: used(twoOrMore, 'light_kappa'),
    },
    notes: [],
  };
  const notes = group.notes;
  const unit = g.pooled ? 'case-method images' : 'cases';

  if (m < 2) {
    notes.push(`only one reader (${readers[0]}): agreement needs at least two readers`);
    return group;
  }
  if (complete.length < matrix.subjects) {
    const left = matrix.subjects - complete.length;
    notes.push(
      `${left} of ${matrix.subjects} ${unit} lack a rating from some reader: ICC, Fleiss' kappa and Kendall's W ` +
        'use the complete ones; the other statistics treat missing ratings as listed under "used"',
    );
  }
  if (s.points === undefined && categories.length > 0) {
    notes.push(
      `no scale given: the categories are the scores observed (${categories.join(', ')}); Gwet's chance agreement depends on them`,
    );
  }

  // Cohen's kappa per reader pair, and Light's mean.
  const columns = readers.map((_, r) => {
    const scores = new Float64Array(matrix.subjects);
    for (let i = 0; i < matrix.subjects; i++) scores[i] = matrix.values[i * m + r];
    return categoryIndices(scores, categories);
  });
  const weights = Object.fromEntries(KAPPA_WEIGHTINGS.map((w) => [w, kappaWeights(categories, w)])) as Record<KappaWeighting, Float64Array>;
  const perWeighting: Record<KappaWeighting, number[]> = { unweighted: [], linear: [], quadratic: [] };
  const noOverlap: string[] = [];
  for (let a = 0; a < m; a++) {
    for (let b = a + 1; b < m; b++) {
      const { table, n } = crossTableOfIndices(columns[a], columns[b], categories.length);
      const pair: CohenPairJson = { readers: [readers[a], readers[b]], n, unweighted: EMPTY, linear: EMPTY, quadratic: EMPTY };
      if (n === 0) noOverlap.push(`${readers[a]}-${readers[b]}`);
      for (const w of KAPPA_WEIGHTINGS) {
        if (n === 0) continue;
        const k = cohenKappaFromTable(table, weights[w], categories.length);
        pair[w] = coefficient(k.value, k.ci95, k.se);
        perWeighting[w].push(k.value);
      }
      group.cohen_pairs.push(pair);
    }
  }
  if (noOverlap.length > 0) notes.push(`Cohen's kappa undefined for reader pairs with no case in common: ${noOverlap.join(', ')}`);
  const undefinedPairs = group.cohen_pairs.filter((p) => p.n > 0 && p.unweighted.value === null).map((p) => p.readers.join('-'));
  if (undefinedPairs.length > 0) {
    notes.push(`Cohen's kappa undefined (both readers used one category only) for: ${undefinedPairs.join(', ')}`);
  }
  for (const w of KAPPA_WEIGHTINGS) {
    const l = lightKappa(perWeighting[w]);
    group.light_kappa[w] = coefficient(l.value, null, null);
    if (w === 'unweighted') group.light_kappa.pairs = l.pairs;
  }

  // Count-based statistics over all subjects.
  const pa = percentAgreement(cc);
  group.percent_agreement = { exact: finite(pa.exact), within_one: finite(pa.withinOne) };
  const gwet = (r: GwetAc): CoefficientEstimate => coefficient(r.value, r.ci95, r.se);
  group.gwet = { ac1: gwet(gwetAc1(cc)), ac2_quadratic: gwet(gwetAc2Quadratic(cc)) };
  if (categories.length < 2) notes.push("Gwet's AC1 and AC2 undefined: they need at least two categories");

  const alpha = krippendorffAlpha(cc);
  const hasFleiss = complete.length > 0;
  const fleiss = hasFleiss ? fleissKappaWeighted(cc, m, new Uint8Array(cc.subjects).fill(1)) : Number.NaN;
  if (!hasFleiss) notes.push(`no ${unit.slice(0, -1)} was scored by every reader: ICC, Fleiss' kappa and Kendall's W undefined`);
  else if (!Number.isFinite(fleiss)) notes.push("Fleiss' kappa undefined: every rating falls in one category, so chance agreement is 1");
  if (alpha.units === 0) notes.push(`Krippendorff's alpha undefined: no ${unit.slice(0, -1)} has two ratings`);
  else if (!Number.isFinite(alpha.nominal)) notes.push("Krippendorff's alpha undefined: every pairable rating is the same value");

  let intervals: ([number, number] | null)[] = [null, null, null, null];
  if (s.resamples > 0 && matrix.subjects > 1) {
    const rng = streamFor(s.seed, 'agreement-bootstrap', JSON.stringify([g.method, g.question]));
    // Cases with equal category counts are interchangeable here: resample over distinct patterns.
    const { patterns, patternOf } = distinctPatterns(cc);
    const alphaOf = weightedAlpha(patterns);
    const fleissOf = weightedFleissKappa(patterns, m);
    const samples = caseBootstrap(matrix.subjects, s.resamples, 4, rng, (w, out) => {
      if (hasFleiss) out[0] = fleissOf(w);
      const a = alphaOf(w);
      out[1] = a.nominal;
      out[2] = a.ordinal;
      out[3] = a.interval;
    }, patternOf, patterns.subjects);
    const found = samples.map(percentileInterval);
    intervals = found.map((f) => f.ci95);
    const point = [fleiss, alpha.nominal, alpha.ordinal, alpha.interval];
    const names = ["Fleiss' kappa", "Krippendorff's alpha (nominal)", "Krippendorff's alpha (ordinal)", "Krippendorff's alpha (interval)"];
    found.forEach((f, i) => {
      if (Number.isFinite(point[i]) && f.used < s.resamples) {
        notes.push(`${names[i]}: 95% CI from the ${f.used} of ${s.resamples} resamples where it is defined`);
      }
    });
  }
  group.fleiss_kappa = coefficient(fleiss, intervals[0], null);
  ALPHA_LEVELS.forEach((level, i) => {
    group.krippendorff_alpha[level] = coefficient(alpha[level], intervals[i + 1], null);
  });

  // Complete-case statistics: ICC and Kendall's W.
  if (complete.length >= 2) {
    const rows = completeRowsOf(matrix);
    const r = icc(rows);
    const summary = iccJson(r);
    group.icc = summary.icc;
    notes.push(...summary.notes);
    const a = r.anova;
    group.icc_anova = {
      between_cases: anovaLine(a.betweenCases),
      within_cases: anovaLine(a.withinCases),
      between_readers: anovaLine(a.betweenReaders),
      residual: anovaLine(a.residual),
      total: a.total,
    };
    const w = kendallW(rows);
    group.kendall_w = { value: finite(w.value), chi2: finite(w.chi2), df: w.df, p: finite(w.p) };
    if (!Number.isFinite(w.value)) notes.push("Kendall's W undefined: every reader gave every case the same score");
  } else if (hasFleiss) {
    notes.push(`ICC and Kendall's W undefined: they need at least two complete ${unit}`);
  }
  return group;
}

function groupsOf(rows: readonly TidyRowInput[], opts: AgreementOptions): GroupInput[] {
  const perMethod = new Map<string, Map<string, GroupInput>>();
  const pooled = new Map<string, GroupInput>();
  const methodsPerQuestion = new Map<string, Set<string>>();
  for (const r of rows) {
    if (opts.method !== undefined && r.method !== opts.method) continue;
    if (opts.question !== undefined && r.question !== opts.question) continue;
    let byQuestion = perMethod.get(r.method);
    if (!byQuestion) perMethod.set(r.method, (byQuestion = new Map()));
    let g = byQuestion.get(r.question);
    if (!g) byQuestion.set(r.question, (g = { method: r.method, question: r.question, pooled: false, rows: [] }));
    g.rows.push(r);
    let p = pooled.get(r.question);
    if (!p) pooled.set(r.question, (p = { method: POOLED, question: r.question, pooled: true, rows: [] }));
    p.rows.push(r);
    let methods = methodsPerQuestion.get(r.question);
    if (!methods) methodsPerQuestion.set(r.question, (methods = new Set()));
    methods.add(r.method);
  }
  const byMethod = [...perMethod.values()].flatMap((m) => [...m.values()]).sort((a, b) => compare(a.method, b.method) || compare(a.question, b.question));
  // Pooling one method would repeat its own group, so pooled groups need two methods or more.
  const byQuestion = [...pooled.values()]
    .filter((p) => (methodsPerQuestion.get(p.question)?.size ?? 0) >= 2)
    .sort((a, b) => compare(a.question, b.question));
  return [...byMethod, ...byQuestion];
}

/**
 * Agreement for every (method, question) in the rows, sorted by method then question, followed by
 * the groups pooled over methods (method "*"), one per question rated under two methods or more.
 */
export function agreementByGroup(rows: readonly TidyRowInput[], opts: AgreementOptions = {}): AgreementGroupJson[] {
  const resamples = opts.bootstrap ?? DEFAULT_BOOTSTRAP_RESAMPLES;
  const seed = opts.seed ?? DEFAULT_BOOTSTRAP_SEED;
  if (!Number.isInteger(resamples) || resamples < 0) throw new RangeError(`bootstrap resamples must be a whole number ≥ 0, got ${resamples}`);
  if (!Number.isInteger(seed) || seed < 0 || seed > Number.MAX_SAFE_INTEGER) throw new RangeError(`seed must be a whole number ≥ 0, got ${seed}`);
  return groupsOf(rows, opts).map((g) => analyseGroup(g, { points: opts.scales?.[g.question]?.points, resamples, seed }));
}

/** The whole report: groups, bootstrap settings and the interpretation convention. */
export function agreementReport(rows: readonly TidyRowInput[], opts: AgreementOptions = {}): AgreementReport {
  const groups = agreementByGroup(rows, opts);
  return {
    groups,
    bootstrap: {
      resamples: opts.bootstrap ?? DEFAULT_BOOTSTRAP_RESAMPLES,
      seed: opts.seed ?? DEFAULT_BOOTSTRAP_SEED,
      method: "percentile interval, cases resampled with replacement (Fleiss' kappa, Krippendorff's alpha); MT19937 stream per group",
    },
    interpretation: INTERPRETATION_CONVENTION,
  };
}
