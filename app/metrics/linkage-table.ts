/**
 * The metric–score linkage (./linkage.ts) as a plain-text table per question, best-tracking metric
 * first, for the command line and the study report.
 */
import type { Estimate, LinkageReport } from './linkage.ts';

const num = (v: number | null, digits = 2): string => (v === null ? 'n/a' : v.toFixed(digits));
const rank = (v: number): string => (Number.isInteger(v) ? String(v) : v.toFixed(1));
const withCi = (e: Estimate): string => (e.ci95 ? `${num(e.value)} [${num(e.ci95[0])}, ${num(e.ci95[1])}]` : num(e.value));

export function formatLinkage(report: LinkageReport): string {
  const out: string[] = [];
  for (const q of report.questions) {
    out.push(`Question "${q.question}": ${q.items} items in ${q.cases} cases, readers ${q.readers.join(', ')}`);
    const rows = q.metrics.map((m) => [
      String(m.rank),
      m.metric,
      m.rankInterval ? `${rank(m.rankInterval[0])}-${rank(m.rankInterval[1])}` : '',
      withCi(m.concordance),
      withCi(m.spearman),
      withCi(m.kendall),
      String(m.items),
    ]);
    const head = ['rank', 'metric', 'rank 95%', 'within-case concordance', "Spearman's rho", "Kendall's tau-b", 'items'];
    const widths = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
    const line = (r: string[]): string => r.map((c, i) => (i < 2 ? c.padEnd(widths[i]) : c.padStart(widths[i]))).join('  ');
    out.push(line(head), ...rows.map(line));
    for (const m of q.metrics) {
      out.push(`  ${m.metric} per reader: ${m.perReader.map((r) => `${r.reader} concordance ${num(r.concordance.value)}, rho ${num(r.spearman.value)}`).join('; ')}`);
    }
    out.push('');
  }
  out.push('Conventions:', ...report.conventions.map((c) => `  - ${c}`));
  return out.join('\n') + '\n';
}
