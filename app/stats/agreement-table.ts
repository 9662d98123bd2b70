/**
 * The agreement report as plain-text tables for the terminal: per group a table of every
 * statistic with its 95% interval and the cases × readers it used, the ICC ANOVA table, the
 * Cohen pairs, then notes; at the end the conventions and how missing ratings were treated.
 * Numbers carry three decimals (percentages one), the same rounding the app's view uses.
 */
import type { AgreementGroupJson, AgreementReport, CoefficientEstimate, StatisticName } from './agreement-types.ts';
import { MISSING } from './agreement.ts';

/** Three decimals; a value that rounds to zero prints 0.000, never -0.000. */
export const fmt3 = (v: number | null): string => (v === null ? 'n/a' : v.toFixed(3).replace(/^-(0\.0+)$/, '$1'));
export const fmtPercent = (v: number | null): string => (v === null ? 'n/a' : `${(100 * v).toFixed(1)}%`);
export const fmtCi = (ci: [number, number] | null): string => (ci === null ? '' : `[${fmt3(ci[0])}, ${fmt3(ci[1])}]`);
export const fmtP = (p: number | null): string => (p === null ? 'n/a' : p < 0.001 ? '< 0.001' : p.toFixed(3));

function table(header: string[], rows: string[][], numeric: boolean[]): string[] {
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c].length)));
  const render = (cells: string[]): string =>
    '  ' + cells.map((s, c) => (numeric[c] ? s.padStart(widths[c]) : s.padEnd(widths[c]))).join('  ').trimEnd();
  return [render(header), '  ' + widths.map((w) => '-'.repeat(w)).join('  '), ...rows.map(render)];
}

function groupTitle(g: AgreementGroupJson): string {
  const method = g.method === '*' ? 'all methods pooled (subject = case x method)' : g.method;
  const cats = g.categories.length ? `${g.categories[0]}-${g.categories[g.categories.length - 1]}` : 'none';
  return `${method} / ${g.question}: ${g.cases} ${g.subject === 'case' ? 'cases' : 'images'}, ${g.readers} readers, ` +
    `${g.ratings} ratings; categories ${cats} (${g.categories_from === 'scale' ? 'from the scale' : 'as observed'})`;
}

function groupBlock(g: AgreementGroupJson): string[] {
  const used = (s: StatisticName): string => `${g.used[s].cases} x ${g.used[s].readers}`;
  const coef = (name: string, e: CoefficientEstimate, stat: StatisticName): string[] =>
    [name, fmt3(e.value), fmtCi(e.ci95), e.interpretation ?? '', used(stat)];
  const rows: string[][] = [
    ...Object.entries(g.icc).map(([form, e]) => [form, fmt3(e.value), fmtCi(e.ci95), '', used('icc')]),
    coef("Fleiss' kappa", g.fleiss_kappa, 'fleiss_kappa'),
    coef("Krippendorff's alpha, nominal", g.krippendorff_alpha.nominal, 'krippendorff_alpha'),
    coef("Krippendorff's alpha, ordinal", g.krippendorff_alpha.ordinal, 'krippendorff_alpha'),
    coef("Krippendorff's alpha, interval", g.krippendorff_alpha.interval, 'krippendorff_alpha'),
    coef("Gwet's AC1", g.gwet.ac1, 'gwet'),
    coef("Gwet's AC2, quadratic", g.gwet.ac2_quadratic, 'gwet'),
    coef("Light's kappa, unweighted", g.light_kappa.unweighted, 'light_kappa'),
    coef("Light's kappa, linear", g.light_kappa.linear, 'light_kappa'),
    coef("Light's kappa, quadratic", g.light_kappa.quadratic, 'light_kappa'),
    ["Kendall's W", fmt3(g.kendall_w.value),
      g.kendall_w.chi2 === null ? '' : `chi2 ${g.kendall_w.chi2.toFixed(2)}, df ${g.kendall_w.df}, p ${fmtP(g.kendall_w.p)}`, '', used('kendall_w')],
    ['Percent agreement, exact', fmtPercent(g.percent_agreement.exact), '', '', used('percent_agreement')],
    ['Percent agreement, within one', fmtPercent(g.percent_agreement.within_one), '', '', used('percent_agreement')],
  ];
  const out = [groupTitle(g), '', ...table(['statistic', 'value', '95% CI', 'word*', 'cases x readers'], rows, [false, true, false, false, true])];
  if (g.icc_anova) {
    const a = g.icc_anova;
    const line = (name: string, l: { df: number; ss: number; ms: number | null }): string[] =>
      [name, String(l.df), l.ss.toFixed(3), fmt3(l.ms)];
    out.push('', ...table(['ICC two-way ANOVA', 'df', 'SS', 'MS'], [
      line('between cases', a.between_cases),
      line('within cases', a.within_cases),
      line('between readers', a.between_readers),
      line('residual', a.residual),
      ['total', String(a.total.df), a.total.ss.toFixed(3), ''],
    ], [false, true, true, true]));
  }
  if (g.cohen_pairs.length > 0) {
    const cell = (e: CoefficientEstimate): string => `${fmt3(e.value)} ${fmtCi(e.ci95)}`.trimEnd();
    out.push('', ...table(
      ["Cohen's kappa, reader pair", 'n', 'unweighted [95% CI]', 'linear [95% CI]', 'quadratic [95% CI]'],
      g.cohen_pairs.map((p) => [p.readers.join(' - '), String(p.n), cell(p.unweighted), cell(p.linear), cell(p.quadratic)]),
      [false, true, false, false, false],
    ));
  }
  if (g.notes.length > 0) out.push('', '  Notes:', ...g.notes.map((n) => `  - ${n}`));
  return out;
}

export function formatAgreementTable(report: AgreementReport): string {
  const lines: string[] = [];
  for (const g of report.groups) lines.push(...groupBlock(g), '');
  if (report.groups.length === 0) lines.push('(no ratings)', '');
  lines.push(`* ${report.interpretation}`);
  lines.push(
    report.bootstrap.resamples > 0
      ? `Intervals of Fleiss' kappa and Krippendorff's alpha: ${report.bootstrap.resamples} bootstrap resamples, seed ${report.bootstrap.seed} ` +
        '(percentile, cases resampled). Cohen: Fleiss, Cohen & Everitt (1969) standard error. Gwet: Gwet (2008) variance, t interval. ' +
        'ICC: F-based (Shrout & Fleiss 1979; McGraw & Wong 1996).'
      : "No bootstrap (--bootstrap 0): Fleiss' kappa and Krippendorff's alpha have no interval.",
  );
  lines.push('Missing ratings:');
  for (const [stat, how] of Object.entries(MISSING)) lines.push(`  ${stat}: ${how}`);
  return lines.join('\n') + '\n';
}
