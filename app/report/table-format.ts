/**
 * A summary table as CSV (RFC 4180, through csv-stringify as the tidy ratings are), Markdown
 * (pipe tables) and LaTeX (booktabs: \toprule, \midrule, \bottomrule; no vertical rules).
 */
import { stringify } from 'csv-stringify/sync';
import type { Cell, ReportTable } from './analysis-types.ts';

/** How a cell is printed in Markdown, LaTeX and HTML: numbers with 3 decimals unless whole. */
export function cellText(v: Cell): string {
  if (v === null) return '–';
  if (typeof v === 'number') return Number.isInteger(v) ? String(v) : v.toFixed(3);
  return v;
}

export function tableCsv(t: ReportTable): string {
  return stringify(t.rows.map((r) => r.map((v) => (v === null ? '' : v))), { header: true, columns: t.columns, record_delimiter: 'windows', quoted_match: /[\r\n]/ });
}

export function tableMarkdown(t: ReportTable): string {
  const esc = (s: string): string => s.replace(/\|/g, '\\|');
  const lines = [
    `**${esc(t.title)}**`,
    '',
    `| ${t.columns.map(esc).join(' | ')} |`,
    `| ${t.numeric.map((n) => (n ? '---:' : ':---')).join(' | ')} |`,
    ...t.rows.map((r) => `| ${r.map((v) => esc(cellText(v))).join(' | ')} |`),
    '',
    `*${esc(t.caption)}*`,
  ];
  return lines.join('\n') + '\n';
}

const LATEX_SPECIAL: Record<string, string> = {
  '\\': '\\textbackslash{}', '&': '\\&', '%': '\\%', $: '\\$', '#': '\\#', _: '\\_', '{': '\\{', '}': '\\}', '~': '\\textasciitilde{}', '^': '\\textasciicircum{}',
};

export function latexEscape(s: string): string {
  return s.replace(/[\\&%$#_{}~^]/g, (c) => LATEX_SPECIAL[c]).replace(/–/g, '--').replace(/−/g, '$-$').replace(/×/g, '$\\times$')
    .replace(/≥/g, '$\\geq$').replace(/κ/g, '$\\kappa$').replace(/ρ/g, '$\\rho$').replace(/χ²/g, '$\\chi^2$');
}

export function tableLatex(t: ReportTable): string {
  return [
    '\\begin{table}[htbp]',
    '  \\centering',
    `  \\caption{${latexEscape(t.title)}. ${latexEscape(t.caption)}}`,
    `  \\label{tab:${t.id}}`,
    `  \\begin{tabular}{${t.numeric.map((n) => (n ? 'r' : 'l')).join('')}}`,
    '    \\toprule',
    `    ${t.columns.map(latexEscape).join(' & ')} \\\\`,
    '    \\midrule',
    ...t.rows.map((r) => `    ${r.map((v) => latexEscape(cellText(v))).join(' & ')} \\\\`),
    '    \\bottomrule',
    '  \\end{tabular}',
    '\\end{table}',
  ].join('\n') + '\n';
}
