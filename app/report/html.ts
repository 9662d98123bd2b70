/**
 * One self-contained HTML report: inline CSS, figures as inline SVG, no script and no outside
 * resource, so it opens offline and can be mailed as one file. Sections: study design,
 * comparisons, agreement, metrics and linkage and blinding strength (when present), reading time,
 * figures, methods paragraph, notes.
 */
import type { AnalysisResult, ReportFigure, ReportTable } from './analysis-types.ts';
import { cellText } from './table-format.ts';
import { RESEARCH_NOTICE } from '../notice.ts';

export const esc = (s: string): string => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

export function tableHtml(t: ReportTable): string {
  const head = t.columns.map((c, i) => `<th class="${t.numeric[i] ? 'num' : ''}">${esc(c)}</th>`).join('');
  const body = t.rows.map((r) => `<tr>${r.map((v, i) => `<td class="${t.numeric[i] ? 'num' : ''}">${esc(cellText(v))}</td>`).join('')}</tr>`).join('\n');
  return `<figure class="table" id="table-${esc(t.id)}" data-table="${esc(t.id)}"><figcaption><b>${esc(t.title)}.</b> ${esc(t.caption)}</figcaption>
<table><thead><tr>${head}</tr></thead><tbody>
${body}
</tbody></table></figure>`;
}

export function figureHtml(f: ReportFigure): string {
  return `<figure class="figure" id="figure-${esc(f.id)}" data-figure="${esc(f.id)}">${f.svg}<figcaption><b>${esc(f.title)}.</b> ${esc(f.caption)}</figcaption></figure>`;
}

const CSS = `
body { font: 14px/1.45 Georgia, 'DejaVu Serif', serif; color: #1d1d1d; max-width: 60rem; margin: 2rem auto; padding: 0 1.2rem; }
h1 { font-size: 1.5rem; margin-bottom: 0.2rem; } h2 { font-size: 1.15rem; margin-top: 2rem; border-bottom: 1px solid #ccc; }
.meta, .notice { color: #555; font-size: 0.85rem; }
.notice { border-left: 3px solid #D55E00; padding-left: 0.6rem; }
table { border-collapse: collapse; font: 12px/1.35 Helvetica, Arial, sans-serif; margin: 0.3rem 0 0.2rem; }
thead tr { border-top: 2px solid #000; border-bottom: 1px solid #000; } tbody tr:last-child { border-bottom: 2px solid #000; }
th, td { padding: 0.2rem 0.55rem; text-align: left; vertical-align: top; } .num { text-align: right; font-variant-numeric: tabular-nums; }
figure { margin: 1rem 0 1.4rem; } figcaption { font-size: 0.85rem; color: #333; max-width: 48rem; }
figure.figure svg { max-width: 100%; height: auto; display: block; }
.methods { background: #f6f6f3; padding: 0.8rem 1rem; white-space: pre-wrap; font-size: 0.9rem; }
`;

export function reportHtml(a: AnalysisResult): string {
  const t = (id: string): string => {
    const x = a.tables.find((y) => y.id === id);
    return x ? tableHtml(x) : '';
  };
  const f = (id: string): string => {
    const x = a.figures.find((y) => y.id === id);
    return x ? figureHtml(x) : '';
  };
  const filter = Object.entries(a.filter).filter(([, v]) => v).map(([k, v]) => `${k} ${v}`).join(', ');
  const sections = [
    `<h1>${esc(a.design.title)}</h1>`,
    `<p class="meta">Analysis by ${esc(a.product)} ${esc(a.version)}, ${esc(a.generatedAt)}; ${a.ratings} ratings${a.simulated ? ` (${a.simulated} from simulated readers)` : ''}${filter ? `; filter: ${esc(filter)}` : ''}.</p>`,
    `<p class="notice">${esc(RESEARCH_NOTICE)}</p>`,
    '<h2 id="design">Study design</h2>', t('design'),
    '<h2 id="comparisons">Method comparison</h2>', t('descriptives'), t('distribution'), f('likert'), t('comparisons'), t('friedman'), t('noninferiority'), f('forest'),
    '<h2 id="agreement">Inter-reader agreement</h2>', a.agreement ? t('agreement') + f('kappa-heatmap') : '<p>Agreement needs at least two readers.</p>',
  ];
  if (a.sections.linkage) sections.push('<h2 id="metrics">Image metrics and linkage</h2>', t('linkage'), f('metric-scatter'));
  if (a.sections.blinding) sections.push('<h2 id="blinding">Blinding strength</h2>', t('blinding-strength'));
  sections.push('<h2 id="reading-time">Reading time</h2>', t('reading-time'), f('reading-time'));
  sections.push('<h2 id="methods">Methods</h2>', `<div class="methods" data-testid="methods-text">${esc(a.methodsText)}</div>`);
  if (a.notes.length) sections.push('<h2 id="notes">Notes</h2>', `<ul>${a.notes.map((n) => `<li>${esc(n)}</li>`).join('')}</ul>`);
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${esc(a.design.title)} — analysis</title>
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<style>${CSS}</style></head>
<body>
${sections.filter(Boolean).join('\n')}
</body></html>
`;
}
