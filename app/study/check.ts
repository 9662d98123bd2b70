/**
 * The study-level check behind `veil check`: resolve the cases, open every source of every method
 * and the reference (one volume in memory at a time), and report, all at once, each naming the
 * case, the method and the file:
 * - problems (a build would fail or the comparison would be unsound): missing or unreadable
 *   sources, slice counts or matrices that differ from the reference, spacing, field of view or
 *   orientation that differ where both sources state them;
 * - warnings: blinding warnings, i.e. differences readers could see that would reveal the method
 *   (matrix sizes, intensity scales), each with the template setting that fixes it; and source
 *   notes (uneven slice spacing, skipped files, ...).
 * Each method is compared with the reference, or with the first method when there is none.
 *
 * Tolerances (ours): spacing and field of view agree within 0.1 %; direction cosines within 0.001;
 * under `intensity: none` a window wider or narrower than the reference's by more than 10 %, or
 * shifted by more than 10 % of its width, is a blinding warning (a difference of that size is
 * visible side by side; from memory, not a published threshold).
 */
import { existsSync } from 'node:fs';
import { percentileWindow } from '../blinding/display-scale.ts';
import { loadVolume } from '../images/load.ts';
import { burnedInDecision } from '../blinding/burned-in.ts';
import { itemStatistics } from '../metrics/item-statistics.ts';
import { blindingStrength, formatBlindingStrength, type BlindingStrength, type ItemFeatures } from '../metrics/blinding-strength.ts';
import { AXIS_CONVENTION } from '../images/volume.ts';
import type { SourceFormat, Volume } from '../images/volume.ts';
import { caseCandidates, sourcePath } from './cases.ts';
import { displayPolicy } from './template.ts';
import type { DisplaySpec, StudyTemplate } from './template.ts';

export interface SourceRow {
  case: string;
  /** A method id, or 'reference'. */
  source: string;
  path: string;
  format?: SourceFormat;
  /** [slices, rows, columns]. */
  shape?: [number, number, number];
  /** mm between pixel centres: [column, row, slice]. */
  spacing?: [number, number, number];
  spacingStated?: boolean;
  orientation?: Volume['orientation'];
  orientationStated?: boolean;
  dataType?: string;
  /** Smallest and largest value. */
  range?: [number, number];
  /** The display percentiles' values (display.percentiles). */
  window?: [number, number];
  notes?: string[];
  error?: string;
}

export interface CheckIssue {
  case: string | null;
  /** A method id, 'reference', or null for the whole study. */
  source: string | null;
  file: string | null;
  /** One line naming the case, the method and the file. */
  message: string;
}

export interface CheckWarning extends CheckIssue {
  kind: 'blinding' | 'source';
  /** For blinding warnings: the template setting that removes the difference. */
  fix?: string;
}

export interface CheckReport {
  ok: boolean;
  template: string;
  title: string;
  axisConvention: string;
  display: DisplaySpec;
  cases: string[];
  /** Folders under sources skipped by `cases: auto` because they hold no method source. */
  ignored: string[];
  sources: SourceRow[];
  problems: CheckIssue[];
  warnings: CheckWarning[];
  /** Could readers tell the methods apart from simple image statistics? Null with fewer than two complete cases. */
  blinding: BlindingStrength | null;
}

export interface CheckProgress { done: number; total: number; what: string }

const SPACING_TOLERANCE = 1e-3;
const ORIENTATION_TOLERANCE = 1e-3;
const INTENSITY_TOLERANCE = 0.1;

/** Numbers in messages and tables: at most 5 significant digits, no exponent for ordinary sizes. */
export function num(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (Number.isInteger(x) && Math.abs(x) < 1e9) return String(x);
  const a = Math.abs(x);
  return a !== 0 && (a >= 1e7 || a < 1e-4) ? x.toExponential(3) : String(Number(x.toPrecision(5)));
}

const shapeText = (s: [number, number, number]): string => `${s[0]} x ${s[1]} x ${s[2]}`;
const relDiff = (a: number, b: number): number => Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b), 1e-12);

function describe(v: Volume, row: SourceRow, display: DisplaySpec): void {
  row.format = v.provenance.format;
  row.shape = [v.slices, v.rows, v.columns];
  row.spacing = [...v.spacing];
  row.spacingStated = v.stated?.spacing ?? false;
  row.orientation = [...v.orientation];
  row.orientationStated = v.stated?.orientation ?? false;
  row.dataType = v.dataType;
  row.range = v.range;
  row.window = percentileWindow(v.pixels, display.percentiles);
  if (v.notes?.length) row.notes = [...v.notes];
}

class Findings {
  readonly problems: CheckIssue[] = [];
  readonly warnings: CheckWarning[] = [];

  private where(caseId: string | null, source: string | null): string {
    if (!caseId) return '';
    return source === 'reference' ? `case ${caseId}, reference` : source ? `case ${caseId}, method ${source}` : `case ${caseId}`;
  }

  problem(caseId: string | null, source: string | null, file: string | null, text: string): void {
    const where = this.where(caseId, source);
    // Loader messages start with the file already; others get it after the case and method.
    const named = file && !text.startsWith(file) ? `${file}: ${text}` : text;
    this.problems.push({ case: caseId, source, file, message: where ? `${where}: ${named}` : named });
  }

  warn(kind: CheckWarning['kind'], caseId: string, source: string, file: string, text: string, fix?: string): void {
    const message = `${this.where(caseId, source)}: ${file}: ${text}${fix ? ` Fix: ${fix}` : ''}`;
    this.warnings.push({ kind, case: caseId, source, file, message, ...(fix ? { fix } : {}) });
  }
}

/** Compares one method's source with the anchor (the reference, else the first method). */
function compare(
  f: Findings, caseId: string, m: SourceRow, anchor: SourceRow, anchorIsReference: boolean, display: DisplaySpec,
): void {
  const [ms, mr, mc] = m.shape!;
  const [as, ar, ac] = anchor.shape!;
  const other = anchorIsReference ? 'the reference' : `the first method, ${anchor.source},`;
  const theirs = anchorIsReference ? "the reference's" : `${anchor.source}'s`;
  const grids = `${shapeText(m.shape!)} vs ${shapeText(anchor.shape!)} (slices x rows x columns; ${anchor.path})`;
  if (ms !== as) {
    f.problem(caseId, m.source, m.path, `has ${ms} slice(s) but ${other} has ${as}: ${grids}; a slice is missing or extra`);
  }
  const inPlaneDiffers = mr !== ar || mc !== ac;
  const resampled = display.matching === 'reference-grid';
  const fix = 'display: {matching: reference-grid} (resamples every method in-plane to one grid, linear interpolation)';
  if (inPlaneDiffers && !resampled) {
    const text = `matrix ${mr} x ${mc} differs from ${theirs} ${ar} x ${ac}: ${grids}; readers would see the difference.`;
    if (anchorIsReference) f.problem(caseId, m.source, m.path, `${text} Fix: ${fix}`);
    else f.warn('blinding', caseId, m.source, m.path, text, fix);
  }
  if (m.spacingStated && anchor.spacingStated) {
    const ms_ = m.spacing!;
    const as_ = anchor.spacing!;
    if (inPlaneDiffers) {
      const fovM = [ms_[0] * mc, ms_[1] * mr];
      const fovA = [as_[0] * ac, as_[1] * ar];
      if (relDiff(fovM[0], fovA[0]) > SPACING_TOLERANCE || relDiff(fovM[1], fovA[1]) > SPACING_TOLERANCE) {
        f.problem(caseId, m.source, m.path, `field of view ${num(fovM[0])} x ${num(fovM[1])} mm differs from ${theirs} ${num(fovA[0])} x ${num(fovA[1])} mm (columns x rows)`);
      }
    } else if (relDiff(ms_[0], as_[0]) > SPACING_TOLERANCE || relDiff(ms_[1], as_[1]) > SPACING_TOLERANCE) {
      f.problem(caseId, m.source, m.path, `pixel spacing ${num(ms_[0])} x ${num(ms_[1])} mm differs from ${theirs} ${num(as_[0])} x ${num(as_[1])} mm (column x row)`);
    }
    if (ms === as && ms > 1 && relDiff(ms_[2], as_[2]) > SPACING_TOLERANCE) {
      f.problem(caseId, m.source, m.path, `slice spacing ${num(ms_[2])} mm differs from ${theirs} ${num(as_[2])} mm`);
    }
  }
  if (m.orientationStated && anchor.orientationStated) {
    const d = m.orientation!.some((x, i) => Math.abs(x - anchor.orientation![i]) > ORIENTATION_TOLERANCE);
    if (d) {
      f.problem(caseId, m.source, m.path, `orientation (row and column direction cosines) ${m.orientation!.map(num).join('\\')} differs from ${theirs} ${anchor.orientation!.map(num).join('\\')}`);
    }
  }
  if (display.intensity === 'none') {
    const [ml, mh] = m.window!;
    const [al, ah] = anchor.window!;
    const ratio = (mh - ml) / (ah - al);
    const shift = Math.abs(ml - al) / (ah - al);
    if (!(Math.max(ratio, 1 / ratio) <= 1 + INTENSITY_TOLERANCE && shift <= INTENSITY_TOLERANCE)) {
      const [pl, ph] = display.percentiles;
      f.warn('blinding', caseId, m.source, m.path,
        `intensities (${num(ml)} to ${num(mh)} at percentiles ${pl} to ${ph}) differ from ${theirs} ` +
          `(${num(al)} to ${num(ah)}), ${num(ratio)} times the width; shown in one window, readers could tell the methods apart.`,
        anchorIsReference ? 'display: {intensity: percentile} or {intensity: match-reference}' : 'display: {intensity: percentile}');
    }
  }
}

/** Runs the check; never throws for bad sources (they become problems). */
export async function checkStudy(template: StudyTemplate, onProgress?: (p: CheckProgress) => void): Promise<CheckReport> {
  const display = displayPolicy(template);
  const f = new Findings();
  const sources: SourceRow[] = [];
  const ignored: string[] = [];
  const cases: string[] = [];
  const candidates = caseCandidates(template);
  if (!candidates) f.problem(null, null, template.file, `sources: folder ${template.sources} does not exist`);

  // Which sources exist, before opening any, so that progress knows the total.
  const plan: { caseId: string; entries: { source: string; path: string }[] }[] = [];
  for (const caseId of candidates ?? []) {
    const entries = [
      ...(template.reference ? [{ source: 'reference', path: sourcePath(template, template.reference, caseId) }] : []),
      ...template.methods.map((m) => ({ source: m.id, path: sourcePath(template, m.path, caseId) })),
    ];
    const present = entries.filter((e) => existsSync(e.path));
    if (template.cases === 'auto' && !present.some((e) => e.source !== 'reference')) {
      ignored.push(caseId);
      continue;
    }
    for (const e of entries) {
      if (!present.includes(e)) f.problem(caseId, e.source, e.path, 'missing source: no such file or folder');
    }
    plan.push({ caseId, entries: present });
  }
  if (candidates && plan.length === 0) f.problem(null, null, template.file, `no case found under ${template.sources} holding the method paths`);

  const total = plan.reduce((n, p) => n + p.entries.length, 0);
  let done = 0;
  const statistics: ItemFeatures[] = [];
  for (const { caseId, entries } of plan) {
    cases.push(caseId);
    let anchor: SourceRow | null = null;
    for (const e of entries) {
      const row: SourceRow = { case: caseId, source: e.source, path: e.path };
      sources.push(row);
      try {
        const v = await loadVolume(e.path);
        describe(v, row, display);
        if (v.burnedIn) {
          const d = burnedInDecision(template.burned_in, true, `${e.path}`);
          if (d.problem) f.problem(caseId, e.source, e.path, d.problem);
          else f.warn('source', caseId, e.source, e.path, d.apply
            ? 'says it carries burned-in text (BurnedInAnnotation YES); the template\'s burned_in regions will be blacked out'
            : 'says it carries burned-in text (BurnedInAnnotation YES); the template says burned_in.apply: never, so check the images yourself');
        }
        if (e.source !== 'reference') statistics.push({ case: caseId, method: e.source, stats: itemStatistics(v, { percentiles: display.percentiles, includeScale: display.intensity === 'none' }) });
      } catch (err) {
        row.error = (err as Error).message;
        f.problem(caseId, e.source, e.path, row.error);
      }
      onProgress?.({ done: ++done, total, what: `case ${caseId}: ${e.source}` });
      for (const note of row.notes ?? []) f.warn('source', caseId, e.source, e.path, note);
      if (row.error) continue;
      if (e.source === 'reference' || !anchor) {
        if (!anchor) anchor = row;
        continue;
      }
      compare(f, caseId, row, anchor, anchor.source === 'reference', display);
    }
  }

  const methodsSeen = new Set(statistics.map((s) => s.method));
  const completeCases = cases.filter((c) => statistics.filter((s) => s.case === c).length === methodsSeen.size);
  const usable = statistics.filter((s) => completeCases.includes(s.case));
  const blinding = completeCases.length >= 2 && methodsSeen.size >= 2 ? blindingStrength(usable, { seed: template.seed }) : null;
  return {
    ok: f.problems.length === 0,
    blinding,
    template: template.file,
    title: template.title,
    axisConvention: AXIS_CONVENTION,
    display,
    cases,
    ignored,
    sources,
    problems: f.problems,
    warnings: f.warnings,
  };
}

/** The report as a table and lists for a terminal. */
export function formatCheckReport(r: CheckReport, counts: { methods: number; questions: number; readers: number }): string {
  const lines: string[] = [];
  lines.push(`${r.template}: "${r.title}", ${counts.methods} methods, ${counts.questions} questions, ${counts.readers} readers`);
  lines.push(`Axis convention: ${r.axisConvention}.`);
  lines.push(`Display: matching ${r.display.matching}, intensity ${r.display.intensity}, percentiles [${r.display.percentiles.join(', ')}].`);
  if (r.sources.length) {
    const header = ['case', 'source', 'format', 'shape (s x r x c)', 'spacing mm (c, r, s)', 'data type', 'range'];
    const rows = r.sources.map((s) => [
      s.case,
      s.source,
      s.format ?? '-',
      s.shape ? shapeText(s.shape) : 'UNREADABLE',
      s.spacing ? `${s.spacing.map(num).join(', ')}${s.spacingStated ? '' : ' (not stated)'}` : '-',
      s.dataType ?? '-',
      s.range ? `${num(s.range[0])} to ${num(s.range[1])}` : '-',
    ]);
    const widths = header.map((h, i) => Math.max(h.length, ...rows.map((row) => row[i].length)));
    const fmt = (cells: string[]): string => cells.map((c, i) => c.padEnd(widths[i])).join('  ').trimEnd();
    lines.push('', fmt(header), ...rows.map(fmt));
  }
  if (r.ignored.length) lines.push('', `Ignored folders (no method source): ${r.ignored.join(', ')}`);
  if (r.warnings.length) {
    lines.push('', `${r.warnings.length} warning(s):`);
    for (const w of r.warnings) lines.push(`  - [${w.kind}] ${w.message}`);
  }
  if (r.blinding) lines.push('', formatBlindingStrength(r.blinding).trimEnd());
  if (r.problems.length) {
    lines.push('', `${r.problems.length} problem(s); a build would fail:`);
    for (const p of r.problems) lines.push(`  - ${p.message}`);
  } else {
    lines.push('', `OK: ${r.cases.length} cases ready to build.`);
  }
  return lines.join('\n') + '\n';
}
