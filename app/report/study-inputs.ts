/**
 * What the report needs from a study folder's workspace: the unblinded ratings, the study design
 * as built, the methods, questions and readers, and the template's `analysis` keys:
 *
 *   analysis:
 *     acceptable: 3               # scores at or above count as acceptable (default 3)
 *     compare_to: m-iterative     # the standard method; pairs are oriented "other − standard"
 *     noninferiority_margin: 0.5  # on the score scale; needs compare_to
 *
 * The keys are read from the template text stored in the workspace (the template as built), so the
 * report follows the study even when the template file has moved. A bad value is an error naming
 * the template, the line and the key, and what would be valid.
 */
import type Database from 'better-sqlite3';
import { LineCounter, parseDocument, isMap, type Node } from 'yaml';
import { openWorkspace, readMetrics, unblindedRatings, workspacePath, type UnblindedRating } from '../store/workspace.ts';
import type { DesignSummary } from '../blinding/design.ts';
import type { MetricRow } from '../metrics/linkage.ts';
import type { BlindingStrength } from '../metrics/blinding-strength.ts';
import type { AnalysisSettings, DesignSection } from './analysis-types.ts';
import { DEFAULT_ACCEPTABLE } from '../stats/comparison/comparison.ts';

export interface StudyInputs {
  ratings: UnblindedRating[];
  design: DesignSection;
  settings: AnalysisSettings;
  seed: number;
  /** Per-item image metrics, when the workspace holds them (null until they are stored). */
  metrics: MetricRow[] | null;
  blinding: BlindingStrength | null;
}

export class AnalysisSettingsError extends Error {}

interface StudyRow { title: string; seed: number; generator: string; template_path: string; template_text: string; design: string | null }

/** The `analysis` keys of a template text, checked against the study's methods and scale. */
export function analysisSettings(templateText: string, file: string, methods: readonly string[], maxPoints: number): AnalysisSettings {
  const lines = new LineCounter();
  const doc = parseDocument(templateText, { lineCounter: lines });
  const root = doc.contents;
  const analysis = isMap(root) ? (root.get('analysis', true) as Node | undefined) : undefined;
  const settings: AnalysisSettings = { acceptable: DEFAULT_ACCEPTABLE, compareTo: null, noninferiorityMargin: null };
  if (analysis === undefined || analysis === null) return settings;
  const where = (node: Node | undefined, key: string): string => {
    const at = node?.range ? lines.linePos(node.range[0]).line : analysis.range ? lines.linePos(analysis.range[0]).line : 1;
    return `${file}:${at}: analysis.${key}`;
  };
  if (!isMap(analysis)) throw new AnalysisSettingsError(`${where(analysis, '')}: analysis must be a mapping (acceptable, compare_to, noninferiority_margin)`.replace('analysis.: ', 'analysis: '));
  const node = (key: string): Node | undefined => analysis.get(key, true) as Node | undefined;
  const value = (key: string): unknown => (node(key) as { toJSON?: () => unknown } | undefined)?.toJSON?.();
  const acceptable = value('acceptable');
  if (acceptable !== undefined) {
    if (typeof acceptable !== 'number' || !Number.isInteger(acceptable) || acceptable < 1 || acceptable > maxPoints) {
      throw new AnalysisSettingsError(`${where(node('acceptable'), 'acceptable')}: ${JSON.stringify(acceptable)} is not valid; give a whole score 1..${maxPoints}`);
    }
    settings.acceptable = acceptable;
  }
  const compareTo = value('compare_to');
  if (compareTo !== undefined && compareTo !== null) {
    if (typeof compareTo !== 'string' || !methods.includes(compareTo)) {
      throw new AnalysisSettingsError(`${where(node('compare_to'), 'compare_to')}: ${JSON.stringify(compareTo)} is not a method of this study; methods: ${methods.join(', ')}`);
    }
    settings.compareTo = compareTo;
  }
  const margin = value('noninferiority_margin');
  if (margin !== undefined && margin !== null) {
    if (typeof margin !== 'number' || !(margin > 0) || margin >= maxPoints) {
      throw new AnalysisSettingsError(`${where(node('noninferiority_margin'), 'noninferiority_margin')}: ${JSON.stringify(margin)} is not valid; give a positive number of score points below ${maxPoints}`);
    }
    settings.noninferiorityMargin = margin;
  }
  return settings;
}

function balanceLines(d: DesignSummary | null): string[] {
  if (!d) return [];
  const out = [
    `methods per session: ${Object.entries(d.methodsBySession).map(([m, n]) => `${m} ${n.join('/')}`).join(', ')}`,
    `mean place in session (0 first, 1 last): ${Object.entries(d.meanPosition).map(([m, p]) => `${m} ${p.toFixed(2)}`).join(', ')}`,
    `items per reader and session: ${Object.entries(d.perSession).map(([r, n]) => `${r} ${n.join('/')}`).join(', ')}`,
  ];
  if (d.leftCount) out.push(`on the left: ${Object.entries(d.leftCount).map(([m, n]) => `${m} ${n}`).join(', ')}`);
  return out;
}

export function readStudyInputs(db: Database.Database): StudyInputs {
  const study = db.prepare('SELECT title, seed, generator, template_path, template_text, design FROM study WHERE id = 1').get() as StudyRow | undefined;
  if (!study) throw new AnalysisSettingsError('the workspace holds no study: build it first (`veil build`)');
  const methods = db.prepare('SELECT id, label FROM method ORDER BY position').all() as { id: string; label: string }[];
  const questions = db.prepare('SELECT id, text, points FROM question ORDER BY position').all() as { id: string; text: string; points: number }[];
  const readers = (db.prepare('SELECT code FROM reader ORDER BY position').all() as { code: string }[]).map((r) => r.code);
  const cases = (db.prepare('SELECT COUNT(*) AS n FROM study_case').get() as { n: number }).n;
  const summary = study.design ? (JSON.parse(study.design) as DesignSummary) : null;
  const templateDoc = parseDocument(study.template_text).toJSON() as { design?: { sessions?: number; washout_days?: number } } | null;
  const hasMetrics = (db.prepare('SELECT COUNT(*) AS n FROM metric').get() as { n: number }).n > 0;
  const blindingJson = (db.prepare('SELECT blinding FROM study WHERE id = 1').get() as { blinding: string | null }).blinding;
  const settings = analysisSettings(study.template_text, study.template_path, methods.map((m) => m.id), Math.max(2, ...questions.map((q) => q.points)));
  return {
    ratings: unblindedRatings(db),
    seed: study.seed,
    settings,
    metrics: hasMetrics ? readMetrics(db) : null,
    blinding: blindingJson ? (JSON.parse(blindingJson) as BlindingStrength) : null,
    design: {
      title: study.title, seed: study.seed, generator: summary?.generator ?? study.generator, presentation: summary?.presentation ?? null,
      sessions: templateDoc?.design?.sessions ?? null, washoutDays: templateDoc?.design?.washout_days ?? null,
      readers, cases, methods, questions, balance: balanceLines(summary),
    },
  };
}

/** Opens the study folder's workspace read-only and reads the inputs. */
export function loadStudyInputs(studyDir: string): StudyInputs {
  const ws = openWorkspace(workspacePath(studyDir), { readonly: true });
  try {
    return readStudyInputs(ws.db);
  } finally {
    ws.close();
  }
}
