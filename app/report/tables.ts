/**
 * The report's summary tables, built from the analysis results. Every table is written as CSV,
 * Markdown and LaTeX (./table-format.ts) and shown in the HTML report and the app.
 */
import type { AgreementReport } from '../stats/agreement-types.ts';
import type { ComparisonReport } from '../stats/comparison/comparison.ts';
import type { LinkageReport } from '../metrics/linkage.ts';
import type { BlindingStrength } from '../metrics/blinding-strength.ts';
import type { Cell, DesignSection, ReportTable } from './analysis-types.ts';

const ci = (c: [number, number] | null | undefined): string => (c ? `[${c[0].toFixed(3)}, ${c[1].toFixed(3)}]` : '–');
const pct = (v: number | null): Cell => (v === null ? null : (100 * v).toFixed(1));
const p3 = (p: number | null | undefined): Cell => (p === null || p === undefined ? null : p < 0.001 ? '< 0.001' : Number(p.toFixed(3)));

function table(id: string, title: string, columns: [string, boolean][], rows: Cell[][], caption: string): ReportTable {
  return { id, title, columns: columns.map((c) => c[0]), numeric: columns.map((c) => c[1]), rows, caption };
}

export function designTable(d: DesignSection): ReportTable {
  const rows: Cell[][] = [
    ['Title', d.title], ['Seed', d.seed], ['Random generator', d.generator], ['Presentation', d.presentation],
    ['Sessions', d.sessions], ['Washout (days)', d.washoutDays], ['Readers', d.readers.join(', ')], ['Cases', d.cases],
    ['Methods', d.methods.map((m) => `${m.id} (${m.label})`).join('; ')],
    ['Questions', d.questions.map((q) => `${q.id} (1–${q.points})`).join('; ')],
    ...d.balance.map((b, i): Cell[] => [i === 0 ? 'Balance' : '', b]),
  ];
  return table('design', 'Study design', [['Item', false], ['Value', false]], rows, 'As built from the study template; the reading order follows from the seed.');
}

export function descriptivesTable(c: ComparisonReport): ReportTable {
  return table('descriptives', 'Scores per method and question', [
    ['Question', false], ['Method', false], ['n', true], ['Mean', true], ['SD', true], ['Median', true], ['IQR', true],
    [`Acceptable (≥ ${c.acceptable}) %`, true], ['95% CI (Wilson)', false],
  ], c.descriptives.map((d) => [
    d.question, d.method, d.n, d.mean, d.sd, d.median, d.q1 === null ? null : `${d.q1}–${d.q3}`,
    pct(d.acceptable.share), d.acceptable.ci95 ? `[${(100 * d.acceptable.ci95[0]).toFixed(1)}, ${(100 * d.acceptable.ci95[1]).toFixed(1)}]` : '–',
  ]), `Every rating counts once (readers and cases pooled). IQR: first–third quartile. Acceptable: share of scores at or above ${c.acceptable} (template analysis.acceptable) with its Wilson 95% interval.`);
}

export function distributionTable(c: ComparisonReport): ReportTable {
  const points = Math.max(0, ...c.descriptives.map((d) => d.counts.length));
  return table('distribution', 'Score distribution', [['Question', false], ['Method', false], ...Array.from({ length: points }, (_, i): [string, boolean] => [String(i + 1), true])],
    c.descriptives.map((d) => [d.question, d.method, ...Array.from({ length: points }, (_, i) => d.counts[i] ?? null)]),
    'Number of ratings at each score.');
}

export function pairsTable(c: ComparisonReport): ReportTable {
  return table('comparisons', 'Method comparisons', [
    ['Question', false], ['Difference', false], ['Cases', true], ['Mean diff.', true], ['Wilcoxon p', true], ['Holm p', true], ['Test', false],
    ['MRMC diff.', true], ['MRMC 95% CI', false], ['df', true], ['MRMC p', true], ['Bootstrap 95% CI', false],
  ], c.pairs.map((p) => [
    p.question, `${p.a} − ${p.b}${p.vsStandard ? ' *' : ''}`, p.cases, p.meanDifference, p3(p.wilcoxon.p), p3(p.pHolm),
    p.wilcoxon.method === 'exact' ? 'exact' : p.wilcoxon.method === 'none' ? '–' : 'normal',
    p.mrmc?.estimate ?? null, ci(p.mrmc?.ci95), p.mrmc?.df === null || p.mrmc?.df === undefined ? null : Number(p.mrmc.df.toFixed(1)), p3(p.mrmc?.p),
    ci(p.bootstrap?.ci95),
  ]), 'Mean diff.: mean over cases of the reader-averaged per-case difference. Wilcoxon signed-rank test on those differences (exact without ties or zeros, else normal approximation with Pratt zeros and tie correction); Holm over all pairs of a question. ' +
    'MRMC: Obuchowski–Rockette with Hillis denominator df, jackknife covariances, readers and cases random. Bootstrap: readers and cases resampled. * against the standard method.');
}

export function friedmanTable(c: ComparisonReport): ReportTable {
  return table('friedman', 'Friedman test across methods', [['Question', false], ['Cases', true], ['Methods', true], ['χ²', true], ['df', true], ['p', true], ["Kendall's W", true]],
    c.friedman.map((f) => [f.question, f.blocks, f.treatments, f.chi2, f.df, p3(f.p), f.w]),
    "Blocks are cases (reader-averaged scores), with tie correction; Kendall's W = χ² / (cases × (methods − 1)) as effect size.");
}

export function noninferiorityTable(c: ComparisonReport): ReportTable | null {
  if (c.noninferiority.length === 0) return null;
  return table('noninferiority', 'Non-inferiority against the standard', [['Question', false], ['Method', false], ['Standard', false], ['Margin', true], ['Difference', true], ['Lower 95% bound', true], ['p (one-sided)', true], ['Non-inferior', false]],
    c.noninferiority.map((n) => [n.question, n.method, n.standard, n.margin, n.estimate, n.lower, p3(n.p), n.noninferior === null ? '–' : n.noninferior ? 'yes' : 'no']),
    `Non-inferior when the lower bound of the MRMC 95% interval of (method − standard) lies above −margin (template analysis.noninferiority_margin).`);
}

export function readingTimeTable(c: ComparisonReport): ReportTable {
  return table('reading-time', 'Reading time per item (seconds)', [['Method', false], ['Session', true], ['Items', true], ['Median', true], ['IQR', false], ['Mean', true], ['SD', true], ['Untimed', true]],
    c.readingTime.map((t) => [t.method, t.session, t.n, t.median, t.q1 === null ? '–' : `${t.q1.toFixed(1)}–${t.q3!.toFixed(1)}`, t.mean, t.sd, t.missing]),
    'Active seconds per item as recorded by the reading room (pauses excluded); one value per item whatever the number of questions.');
}

export function agreementTable(a: AgreementReport): ReportTable {
  return table('agreement', 'Inter-reader agreement', [
    ['Question', false], ['Method', false], ['Cases', true], ['Readers', true], ['ICC(2,1)', true], ['95% CI', false],
    ["Fleiss' κ", true], ["Krippendorff's α (ordinal)", true], ["Light's κ (quadratic)", true], ["Kendall's W", true], ['Exact agreement %', true],
  ], a.groups.map((g) => [
    g.question, g.method === '*' ? 'all (pooled)' : g.method, g.cases, g.readers, g.icc['ICC(2,1)'].value, ci(g.icc['ICC(2,1)'].ci95),
    g.fleiss_kappa.value, g.krippendorff_alpha.ordinal.value, g.light_kappa.quadratic.value, g.kendall_w.value, pct(g.percent_agreement.exact),
  ]), `Full statistics per group in the agreement view and \`veil agreement\`. ${a.interpretation}`);
}

export function linkageTable(l: LinkageReport): ReportTable {
  const rows: Cell[][] = [];
  for (const q of l.questions) {
    for (const m of q.metrics) rows.push([q.question, m.metric, m.rank, m.spearman.value, ci(m.spearman.ci95), m.kendall.value, m.concordance.value, ci(m.concordance.ci95)]);
  }
  return table('linkage', 'Metric–score linkage', [['Question', false], ['Metric', false], ['Rank', true], ["Spearman's ρ", true], ['95% CI', false], ["Kendall's τb", true], ['Within-case concordance', true], ['95% CI', false]],
    rows, l.conventions.join(' '));
}

export function blindingTable(b: BlindingStrength): ReportTable {
  return table('blinding-strength', 'Blinding strength', [['Statistics', false], ['Accuracy', true], ['Chance', true], ['p', true]],
    [['all', b.accuracy, b.chance, p3(b.pValue)], ...b.perStatistic.map((s): Cell[] => [s.label, s.accuracy, b.chance, p3(s.pValue)])],
    `Leave-one-case-out nearest-centroid accuracy of telling the methods apart from simple image statistics; permutation p (${b.permutations} permutations). ${b.warning ?? 'No warning.'}`);
}
