/**
 * Writes a report folder:
 *   ratings.csv            tidy ratings with the unblinded method (design.md "Tidy ratings")
 *   tables/<id>.csv        every summary table
 *   tables.md, tables.tex  every table as Markdown and as LaTeX (booktabs)
 *   figures/<id>.svg|png   every figure (PNG at 2x through resvg)
 *   report.html            one self-contained HTML report
 *   methods.txt            the methods paragraph with references
 *   analysis.json          the numbers behind it all
 * Written into a staging folder beside the target, then moved into place, so a failed export
 * leaves any earlier report untouched.
 */
import { existsSync, mkdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { Resvg } from '@resvg/resvg-js';
import type { AnalysisResult } from './analysis-types.ts';
import { writeTidyCsv, type TidyRowInput } from './tidy-csv.ts';
import { tableCsv, tableLatex, tableMarkdown } from './table-format.ts';
import { reportHtml } from './html.ts';

export interface WrittenReport { dir: string; files: string[] }

export function svgToPng(svg: string): Buffer {
  return new Resvg(svg, { fitTo: { mode: 'zoom', value: 2 }, font: { loadSystemFonts: true, defaultFontFamily: 'DejaVu Sans' } }).render().asPng();
}

export function writeReport<R extends TidyRowInput>(out: string, analysis: AnalysisResult, ratings: readonly R[], extraColumns: readonly (keyof R & string)[]): WrittenReport {
  const dir = resolve(out);
  const stage = join(dirname(dir), `.${basename(dir)}.staging-${process.pid}`);
  rmSync(stage, { recursive: true, force: true });
  mkdirSync(join(stage, 'tables'), { recursive: true });
  mkdirSync(join(stage, 'figures'), { recursive: true });
  const files: string[] = [];
  const put = (rel: string, data: string | Buffer): void => {
    writeFileSync(join(stage, rel), data);
    files.push(rel);
  };
  try {
    put('ratings.csv', writeTidyCsv(ratings, extraColumns));
    for (const t of analysis.tables) put(join('tables', `${t.id}.csv`), tableCsv(t));
    put('tables.md', `# ${analysis.design.title}: tables\n\n` + analysis.tables.map(tableMarkdown).join('\n'));
    put('tables.tex', '% Tables of the analysis; needs \\usepackage{booktabs}\n' + analysis.tables.map(tableLatex).join('\n'));
    for (const f of analysis.figures) {
      put(join('figures', `${f.id}.svg`), f.svg);
      put(join('figures', `${f.id}.png`), svgToPng(f.svg));
    }
    put('report.html', reportHtml(analysis));
    put('methods.txt', analysis.methodsText + '\n');
    put('analysis.json', JSON.stringify(analysis, (k, v) => (k === 'svg' ? undefined : v), 2) + '\n');
    if (existsSync(dir)) {
      // Keep whatever else the user keeps in the folder; replace only our files.
      for (const rel of files) {
        mkdirSync(dirname(join(dir, rel)), { recursive: true });
        renameSync(join(stage, rel), join(dir, rel));
      }
      rmSync(stage, { recursive: true, force: true });
    } else {
      mkdirSync(dirname(dir), { recursive: true });
      renameSync(stage, dir);
    }
  } catch (e) {
    rmSync(stage, { recursive: true, force: true });
    throw e;
  }
  return { dir, files };
}
