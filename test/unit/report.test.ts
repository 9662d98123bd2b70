/**
 * `veil report` end to end on a real workspace: a tiny study is built, answers are added to its
 * workspace, and the report folder is written — ratings, every table as CSV, Markdown and LaTeX,
 * every figure as SVG and PNG, the HTML report — with the template's analysis keys honoured.
 */
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildStudy } from '../../app/blinding/build.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { addWorkspaceAnswers, openWorkspace, workspacePath } from '../../app/store/workspace.ts';
import { analysisSettings, loadStudyInputs } from '../../app/report/study-inputs.ts';
import { buildAnalysis } from '../../app/report/build-report.ts';
import { writeReport } from '../../app/report/write-report.ts';
import { tableLatex, tableMarkdown } from '../../app/report/table-format.ts';
import { analysisOps } from '../../app/analysis-ops.ts';
import { ApiError } from '../../app/api-contract.ts';
import { writeTinyStudy } from './helpers.ts';

let study: string;

beforeAll(async () => {
  const t = writeTinyStudy({ readers: ['R1', 'R2', 'R3'], extraYaml: 'analysis:\n  acceptable: 2\n  compare_to: m-alpha\n  noninferiority_margin: 0.5\n' });
  study = join(t.dir, 'study');
  await buildStudy(loadTemplate(t.template), study);
  const ws = openWorkspace(workspacePath(study));
  try {
    const items = ws.db.prepare('SELECT item_id, reader_code, case_id, method_id FROM kit_item').all() as { item_id: string; reader_code: string; case_id: string; method_id: string }[];
    const answers = items.flatMap((it, i) => [
      { itemId: it.item_id, questionId: 'sharpness', score: 1 + ((i + (it.method_id === 'm-beta' ? 2 : 0)) % 5), seconds: 10 + i, source: 'collected' as const },
      { itemId: it.item_id, questionId: 'noise', score: 1 + ((i * 3) % 4), seconds: 10 + i, source: 'collected' as const },
    ]);
    addWorkspaceAnswers(ws.db, answers);
  } finally {
    ws.close();
  }
}, 60_000);

describe('report inputs', () => {
  it('reads the analysis keys from the template stored in the workspace', () => {
    const inputs = loadStudyInputs(study);
    expect(inputs.settings).toEqual({ acceptable: 2, compareTo: 'm-alpha', noninferiorityMargin: 0.5 });
    expect(inputs.ratings).toHaveLength(3 * 3 * 2 * 2);
    expect(inputs.design.readers).toEqual(['R1', 'R2', 'R3']);
  });
  it('names the template, line and key of a bad analysis value', () => {
    const text = 'title: x\nanalysis:\n  acceptable: 2\n  compare_to: m-gamma\n';
    expect(() => analysisSettings(text, 'x.study.yaml', ['m-alpha', 'm-beta'], 5)).toThrow(/^x\.study\.yaml:4: analysis\.compare_to: "m-gamma" is not a method of this study; methods: m-alpha, m-beta/);
    expect(() => analysisSettings('analysis:\n  acceptable: 9\n', 't.yaml', ['a'], 5)).toThrow(/t\.yaml:2: analysis\.acceptable: 9 is not valid; give a whole score 1\.\.5/);
    expect(analysisSettings('title: x\n', 't.yaml', ['a'], 5)).toEqual({ acceptable: 3, compareTo: null, noninferiorityMargin: null });
  });
});

describe('report folder', () => {
  it('writes ratings, tables (CSV, Markdown, LaTeX), figures (SVG, PNG) and one self-contained HTML report', async () => {
    const inputs = loadStudyInputs(study);
    const analysis = await buildAnalysis(inputs, { resamples: 200 });
    const out = join(study, '..', 'report');
    const written = writeReport(out, analysis, inputs.ratings, ['session', 'seconds', 'source']);
    const ids = analysis.tables.map((t) => t.id);
    // The study's slices are too small for SSIM, so there are no metrics (no linkage), but the blinding-strength check runs.
    expect(ids).toEqual(['design', 'descriptives', 'distribution', 'comparisons', 'friedman', 'noninferiority', 'agreement', 'reading-time', 'blinding-strength']);
    expect(analysis.figures.map((f) => f.id)).toEqual(['likert', 'forest', 'kappa-heatmap', 'reading-time']);
    for (const id of ids) expect(existsSync(join(out, 'tables', `${id}.csv`))).toBe(true);
    for (const f of analysis.figures) {
      expect(readFileSync(join(out, 'figures', `${f.id}.svg`), 'utf8')).toMatch(/^<svg /);
      expect(readFileSync(join(out, 'figures', `${f.id}.png`)).subarray(1, 4).toString()).toBe('PNG');
    }
    expect(written.files).toContain('ratings.csv');
    expect(readFileSync(join(out, 'ratings.csv'), 'utf8').split('\r\n')[0]).toBe('case,reader,method,question,score,session,seconds,source');
    const html = readFileSync(join(out, 'report.html'), 'utf8');
    for (const id of ids) expect(html).toContain(`data-table="${id}"`);
    for (const f of analysis.figures) expect(html).toContain(`data-figure="${f.id}"`);
    expect(html).not.toMatch(/<script|src="http|href="http/);
    // The standard method orients the pairs and the margin drives the non-inferiority table.
    expect(analysis.comparison.pairs.every((p) => p.b === 'm-alpha' || p.a === 'm-alpha')).toBe(true);
    expect(analysis.comparison.noninferiority.map((n) => n.method)).toEqual(['m-beta', 'm-beta']);
    expect(analysis.methodsText).toMatch(/Obuchowski–Rockette model \[\d+\].*Hillis's denominator degrees of freedom \[\d+\]/s);
    expect(analysis.methodsText).toMatch(/Veil \d+\.\d+\.\d+/);
    expect(analysis.methodsText).toMatch(/Hillis SL\. A comparison of denominator degrees of freedom/);
    const tex = readFileSync(join(out, 'tables.tex'), 'utf8');
    expect(tex).toContain('\\toprule');
    expect(tex).toContain('\\label{tab:comparisons}');
    expect(readFileSync(join(out, 'tables.md'), 'utf8')).toContain('| Question | Method | n | Mean |');
  }, 60_000);

  it('filters by reader, and a single reader has no agreement section', async () => {
    const analysis = await buildAnalysis(loadStudyInputs(study), { resamples: 0, filter: { reader: 'R2' } });
    expect(analysis.ratings).toBe(3 * 2 * 2);
    expect(analysis.agreement).toBeNull();
    expect(analysis.notes.join(' ')).toMatch(/agreement needs at least two readers/);
  }, 30_000);
});

describe('table formats', () => {
  const t = { id: 'x', title: 'A & B', columns: ['Name', 'Value'], numeric: [false, true], rows: [['a_1', 0.12345], ['b|c', null]], caption: '50% of κ' };
  it('escapes LaTeX specials and uses booktabs rules', () => {
    const tex = tableLatex(t);
    expect(tex).toContain('\\caption{A \\& B. 50\\% of $\\kappa$}');
    expect(tex).toContain('a\\_1 & 0.123 \\\\');
    expect(tex.indexOf('\\toprule')).toBeLessThan(tex.indexOf('\\midrule'));
  });
  it('escapes pipes in Markdown and right-aligns numbers', () => {
    const md = tableMarkdown(t);
    expect(md).toContain('| :--- | ---: |');
    expect(md).toContain('| b\\|c | – |');
  });
});

describe('analysis API operations', () => {
  it('refuse in a reading kit', async () => {
    const ops = analysisOps(join(study, 'kits', 'R1'), 'kit');
    await expect(ops.analysis({})).rejects.toMatchObject({ status: 403 });
    await expect(ops.exportReport({ out: 'x' })).rejects.toBeInstanceOf(ApiError);
  });
  it('reject an unknown filter value by name', async () => {
    await expect(analysisOps(study, 'study').analysis({ method: 'm-none' })).rejects.toThrow(/no method "m-none" in this study; methods: m-alpha, m-beta/);
  }, 30_000);
});
