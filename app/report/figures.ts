/**
 * The report's figures as SVG, from declarative Vega-Lite specifications rendered in Node (Vega's
 * headless view, no browser). Sized for a journal column (about 3.3 in, 320 px wide at 96 dpi)
 * with 10–11 px text; colours from ./palette.ts (Okabe & Ito 2008; Paul Tol 2021).
 *
 *   likert        diverging stacked bars of the score distribution per method and question
 *                 (Robbins & Heiberger 2011, "Plotting Likert and other rating scales", JSM
 *                 Proceedings: the middle score straddles zero)
 *   forest        method differences with 95% intervals (MRMC and two-way bootstrap), the
 *                 non-inferiority margin when set
 *   scatter       metric versus reader-mean score, one panel per question (when metrics exist)
 *   kappa-heatmap reader × reader Cohen's kappa (quadratic weights), per question
 *   reading-time  reading time per item by method and session (box plots)
 */
import * as vega from 'vega';
import { compile, type TopLevelSpec } from 'vega-lite';
import type { AgreementReport } from '../stats/agreement-types.ts';
import type { ComparisonReport } from '../stats/comparison/comparison.ts';
import type { LinkageReport } from '../metrics/linkage.ts';
import type { ReportFigure } from './analysis-types.ts';
import { FONT, OKABE_ITO, YL_OR_BR, likertColours } from './palette.ts';

const WIDTH = 320;

/** Vega-Lite's compile warnings are for spec authors; the figures here are fixed, so they stay quiet. */
const QUIET = vega.logger(vega.None);

const CONFIG = {
  font: FONT,
  axis: { labelFontSize: 10, titleFontSize: 11, grid: false },
  legend: { labelFontSize: 10, titleFontSize: 10, orient: 'bottom' as const },
  header: { labelFontSize: 11, titleFontSize: 11 },
  title: { fontSize: 12 },
  view: { stroke: null },
  background: 'white',
};

export async function renderSvg(spec: TopLevelSpec): Promise<string> {
  const compiled = compile({ ...spec, config: { ...CONFIG, ...(spec.config ?? {}) } } as TopLevelSpec, { logger: QUIET }).spec;
  const view = new vega.View(vega.parse(compiled), { renderer: 'none' });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

function emptySpec(message: string): TopLevelSpec {
  return { width: WIDTH, height: 60, data: { values: [{ t: message }] }, mark: { type: 'text', fontSize: 11, color: '#444' }, encoding: { text: { field: 't' } } };
}

export function likertSpec(c: ComparisonReport, points: number): TopLevelSpec {
  const values: Record<string, unknown>[] = [];
  const mid = (points + 1) / 2;
  for (const d of c.descriptives) {
    if (d.n === 0) continue;
    const share = d.counts.map((k) => (100 * k) / d.n);
    // Start left of zero by everything below the middle (and half the middle score when odd).
    let x = -share.reduce((s, v, i) => s + (i + 1 < mid ? v : i + 1 === mid ? v / 2 : 0), 0);
    share.forEach((v, i) => {
      values.push({ question: d.question, method: d.method, score: i + 1, x, x2: x + v, share: v });
      x += v;
    });
  }
  const colours = likertColours(points);
  return {
    data: { values },
    facet: { row: { field: 'question', type: 'nominal', title: null, sort: [...c.questions], header: { labelAngle: 0, labelAlign: 'left', labelAnchor: 'start', labelOrient: 'top' } } },
    spec: {
      width: WIDTH, height: { step: 16 },
      layer: [
        {
          mark: { type: 'bar', stroke: 'white', strokeWidth: 0.5 },
          encoding: {
            y: { field: 'method', type: 'nominal', title: null, sort: c.methods },
            x: { field: 'x', type: 'quantitative', title: 'Share of ratings (%), left of 0 below the middle score', scale: { domain: [-100, 100] } },
            x2: { field: 'x2' },
            color: { field: 'score', type: 'ordinal', title: 'Score', scale: { domain: Array.from({ length: points }, (_, i) => i + 1), range: colours } },
            tooltip: [{ field: 'method' }, { field: 'score' }, { field: 'share', format: '.1f' }],
          },
        },
        { mark: { type: 'rule', color: '#333' }, encoding: { x: { datum: 0 } } },
      ],
    },
  } as TopLevelSpec;
}

export function forestSpec(c: ComparisonReport): TopLevelSpec {
  const values: Record<string, unknown>[] = [];
  for (const p of c.pairs) {
    const label = `${p.a} − ${p.b}`;
    if (p.mrmc?.ci95) values.push({ question: p.question, pair: label, estimator: 'MRMC (OR–Hillis)', est: p.mrmc.estimate, lo: p.mrmc.ci95[0], hi: p.mrmc.ci95[1] });
    if (p.bootstrap?.ci95) values.push({ question: p.question, pair: label, estimator: 'Two-way bootstrap', est: p.bootstrap.estimate, lo: p.bootstrap.ci95[0], hi: p.bootstrap.ci95[1] });
  }
  if (values.length === 0) return emptySpec('No interval: MRMC needs two readers and two complete cases.');
  const rows = { y: { field: 'pair', type: 'nominal', title: null, axis: { labelLimit: 260 } }, yOffset: { field: 'estimator', type: 'nominal' } };
  const estimatorColour = { field: 'estimator', type: 'nominal', title: null, scale: { range: [OKABE_ITO[4], OKABE_ITO[0]] } };
  const layers: unknown[] = [
    { mark: { type: 'rule', color: '#888', strokeDash: [3, 3] }, encoding: { x: { datum: 0 } } },
    { mark: { type: 'rule', strokeWidth: 1.5 }, encoding: { x: { field: 'lo', type: 'quantitative', title: 'Difference in mean score (95% CI)' }, x2: { field: 'hi' }, ...rows, color: estimatorColour } },
    { mark: { type: 'point', filled: true, size: 40, opacity: 1 }, encoding: { x: { field: 'est', type: 'quantitative' }, ...rows, color: estimatorColour, shape: { field: 'estimator', type: 'nominal', title: null, legend: null } } },
  ];
  if (c.margin !== null) layers.splice(1, 0, { mark: { type: 'rule', color: '#D55E00', strokeDash: [6, 2] }, encoding: { x: { datum: -c.margin } } });
  return {
    data: { values },
    facet: { row: { field: 'question', type: 'nominal', title: null, sort: [...c.questions], header: { labelAngle: 0, labelAlign: 'left', labelAnchor: 'start', labelOrient: 'top' } } },
    spec: {
      width: WIDTH, height: { step: 14 },
      layer: layers,
    },
  } as TopLevelSpec;
}

export function scatterSpec(l: LinkageReport, methods: readonly string[]): TopLevelSpec {
  const values: Record<string, unknown>[] = [];
  for (const q of l.questions) {
    const top = q.metrics[0];
    if (!top) continue;
    const rho = top.spearman.value === null ? 'n/a' : top.spearman.value.toFixed(2);
    for (const p of q.points) {
      const v = p.metrics[top.metric];
      if (v === null || v === undefined) continue;
      values.push({ panel: `${q.question}: ${top.metric} (ρ = ${rho})`, method: p.method, metric: v, score: p.score });
    }
  }
  if (values.length === 0) return emptySpec('No metric values in the workspace.');
  return {
    data: { values },
    facet: { row: { field: 'panel', type: 'nominal', title: null, header: { labelAngle: 0, labelAlign: 'left', labelAnchor: 'start', labelOrient: 'top' } } },
    spec: {
      width: WIDTH, height: 160,
      mark: { type: 'point', filled: true, size: 36, opacity: 0.85 },
      encoding: {
        x: { field: 'metric', type: 'quantitative', title: 'Metric value (best-ranked metric of the question)', scale: { zero: false } },
        y: { field: 'score', type: 'quantitative', title: 'Reader-mean score', scale: { zero: false } },
        color: { field: 'method', type: 'nominal', title: 'Method', sort: [...methods], scale: { range: OKABE_ITO } },
        shape: { field: 'method', type: 'nominal', sort: [...methods] },
      },
    },
    resolve: { scale: { x: 'independent' } },
  } as TopLevelSpec;
}

export function kappaHeatmapSpec(a: AgreementReport): TopLevelSpec {
  const values: Record<string, unknown>[] = [];
  const questions = [...new Set(a.groups.map((g) => g.question))];
  for (const q of questions) {
    const g = a.groups.find((x) => x.question === q && x.method === '*') ?? a.groups.find((x) => x.question === q);
    if (!g) continue;
    const label = g.method === '*' ? q : `${q} (${g.method})`;
    const readers = [...new Set(g.cohen_pairs.flatMap((p) => p.readers))];
    for (const r of readers) values.push({ panel: label, a: r, b: r, kappa: 1 });
    for (const p of g.cohen_pairs) {
      const k = p.quadratic.value;
      values.push({ panel: label, a: p.readers[0], b: p.readers[1], kappa: k }, { panel: label, a: p.readers[1], b: p.readers[0], kappa: k });
    }
  }
  if (values.length === 0) return emptySpec('Kappa needs at least two readers.');
  return {
    data: { values },
    facet: { field: 'panel', type: 'nominal', title: null, sort: questions, header: { labelFontSize: 11 } },
    columns: 3,
    spacing: 24,
    spec: {
      width: { step: 34 }, height: { step: 34 },
      encoding: { x: { field: 'a', type: 'nominal', title: null }, y: { field: 'b', type: 'nominal', title: null } },
      layer: [
        { mark: 'rect', encoding: { color: { field: 'kappa', type: 'quantitative', title: "Cohen's κ (quadratic)", scale: { domain: [0, 1], range: YL_OR_BR.slice(0, 7) } } } },
        { mark: { type: 'text', fontSize: 10 }, encoding: { text: { field: 'kappa', type: 'quantitative', format: '.2f' }, color: { condition: { test: 'datum.kappa > 0.7', value: 'white' }, value: 'black' } } },
      ],
    },
  } as TopLevelSpec;
}

export function readingTimeSpec(items: { method: string; session: number; seconds: number }[], methods: readonly string[]): TopLevelSpec {
  if (items.length === 0) return emptySpec('No reading times recorded (simulated readers record none).');
  return {
    data: { values: items.map((i) => ({ ...i, session: `Session ${i.session}` })) },
    width: WIDTH, height: 180,
    mark: { type: 'boxplot', extent: 1.5, size: 14 },
    encoding: {
      x: { field: 'session', type: 'nominal', title: null },
      xOffset: { field: 'method', type: 'nominal', sort: [...methods] },
      y: { field: 'seconds', type: 'quantitative', title: 'Seconds per item', scale: { zero: true } },
      color: { field: 'method', type: 'nominal', title: 'Method', sort: [...methods], scale: { range: OKABE_ITO } },
    },
  } as TopLevelSpec;
}

export interface FigureInputs {
  comparison: ComparisonReport;
  points: number;
  agreement: AgreementReport | null;
  linkage: LinkageReport | null;
  timedItems: { method: string; session: number; seconds: number }[];
}

export async function buildFigures(x: FigureInputs): Promise<ReportFigure[]> {
  const out: ReportFigure[] = [];
  const add = async (id: string, title: string, caption: string, spec: TopLevelSpec): Promise<void> => {
    out.push({ id, title, caption, svg: await renderSvg(spec) });
  };
  await add('likert', 'Score distribution', 'Diverging stacked bars: share of ratings at each score per method; scores below the middle of the scale extend to the left of zero, the middle score straddles it.', likertSpec(x.comparison, x.points));
  await add('forest', 'Method differences', `Difference in mean score with 95% intervals: Obuchowski–Rockette–Hillis (readers and cases random) and two-way bootstrap.${x.comparison.margin !== null ? ` Dashed orange line: −margin (${x.comparison.margin}).` : ''}`, forestSpec(x.comparison));
  if (x.linkage) await add('metric-scatter', 'Metric versus score', "Reader-mean score of each item against the question's best-ranked image metric, with Spearman's ρ.", scatterSpec(x.linkage, x.comparison.methods));
  if (x.agreement) await add('kappa-heatmap', 'Reader × reader agreement', "Cohen's kappa with quadratic weights for each pair of readers (pooled over methods where more than one).", kappaHeatmapSpec(x.agreement));
  await add('reading-time', 'Reading time', 'Active seconds per item by method and session (box: quartiles; whiskers: 1.5 IQR).', readingTimeSpec(x.timedItems, x.comparison.methods));
  return out;
}
