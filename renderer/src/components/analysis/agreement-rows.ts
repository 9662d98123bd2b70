/**
 * The rows of the agreement table and how a cell is written. Numbers carry three decimals and
 * percentages one, the rounding `veil agreement` prints, so the view and the terminal agree.
 */
import type { AgreementGroupJson } from '../../../../app/api-contract.ts';

export interface CellValue {
  value: number | null;
  ci95: [number, number] | null;
  /** A Landis & Koch word (a convention), where the statistic is kappa-type. */
  word: string | null;
  /** A line under the value, e.g. Kendall's chi-square test. */
  detail?: string;
  percent?: boolean;
}

type Used = keyof AgreementGroupJson['used'];

export interface StatRow {
  key: string;
  label: string;
  used: Used;
  cell(g: AgreementGroupJson): CellValue;
}

const coef = (e: { value: number | null; ci95: [number, number] | null; interpretation: string | null }): CellValue =>
  ({ value: e.value, ci95: e.ci95, word: e.interpretation });

const ICC_LABELS: [string, string][] = [
  ['ICC(1,1)', 'one-way random, single'], ['ICC(2,1)', 'two-way random, absolute, single'], ['ICC(3,1)', 'two-way mixed, consistency, single'],
  ['ICC(1,k)', 'one-way random, mean of k'], ['ICC(2,k)', 'two-way random, absolute, mean of k'], ['ICC(3,k)', 'two-way mixed, consistency, mean of k'],
];

/** Three decimals; a value that rounds to zero prints 0.000, never -0.000. */
export const fmt3 = (v: number | null): string => (v === null ? 'n/a' : v.toFixed(3).replace(/^-(0\.0+)$/, '$1'));
export const fmtPercent = (v: number | null): string => (v === null ? 'n/a' : `${(100 * v).toFixed(1)}%`);
export const fmtCi = (ci: [number, number] | null): string => (ci === null ? '' : `[${fmt3(ci[0])}, ${fmt3(ci[1])}]`);
export const fmtP = (p: number | null): string => (p === null ? 'n/a' : p < 0.001 ? '< 0.001' : p.toFixed(3));

export const STAT_ROWS: StatRow[] = [
  ...ICC_LABELS.map(([form, what]): StatRow => ({
    key: form, label: `${form} · ${what}`, used: 'icc',
    cell: (g) => ({ value: g.icc[form as keyof AgreementGroupJson['icc']].value, ci95: g.icc[form as keyof AgreementGroupJson['icc']].ci95, word: null }),
  })),
  { key: 'fleiss', label: "Fleiss' kappa", used: 'fleiss_kappa', cell: (g) => coef(g.fleiss_kappa) },
  { key: 'alpha-nominal', label: "Krippendorff's alpha · nominal", used: 'krippendorff_alpha', cell: (g) => coef(g.krippendorff_alpha.nominal) },
  { key: 'alpha-ordinal', label: "Krippendorff's alpha · ordinal", used: 'krippendorff_alpha', cell: (g) => coef(g.krippendorff_alpha.ordinal) },
  { key: 'alpha-interval', label: "Krippendorff's alpha · interval", used: 'krippendorff_alpha', cell: (g) => coef(g.krippendorff_alpha.interval) },
  { key: 'ac1', label: "Gwet's AC1", used: 'gwet', cell: (g) => coef(g.gwet.ac1) },
  { key: 'ac2', label: "Gwet's AC2 · quadratic", used: 'gwet', cell: (g) => coef(g.gwet.ac2_quadratic) },
  { key: 'light-unweighted', label: "Light's kappa · unweighted", used: 'light_kappa', cell: (g) => coef(g.light_kappa.unweighted) },
  { key: 'light-linear', label: "Light's kappa · linear", used: 'light_kappa', cell: (g) => coef(g.light_kappa.linear) },
  { key: 'light-quadratic', label: "Light's kappa · quadratic", used: 'light_kappa', cell: (g) => coef(g.light_kappa.quadratic) },
  {
    key: 'kendall', label: "Kendall's W", used: 'kendall_w',
    cell: (g) => ({
      value: g.kendall_w.value, ci95: null, word: null,
      detail: g.kendall_w.chi2 === null ? undefined : `χ² ${g.kendall_w.chi2.toFixed(2)}, df ${g.kendall_w.df}, p ${fmtP(g.kendall_w.p)}`,
    }),
  },
  { key: 'exact', label: 'Agreement · exact', used: 'percent_agreement', cell: (g) => ({ value: g.percent_agreement.exact, ci95: null, word: null, percent: true }) },
  { key: 'within-one', label: 'Agreement · within one point', used: 'percent_agreement', cell: (g) => ({ value: g.percent_agreement.within_one, ci95: null, word: null, percent: true }) },
];

export const methodLabel = (method: string): string => (method === '*' ? 'all methods' : method);
