/**
 * Blinding-strength check: could a reader tell the methods apart from simple image statistics
 * (./item-statistics.ts) alone?
 *
 * Classifier: nearest centroid (Tibshirani, Hastie, Narasimhan & Chu 2002, "Diagnosis of multiple
 * cancer types by shrunken centroids of gene expression", PNAS 99(10):6567–6572, without shrinkage):
 * each statistic is standardized by the mean and population standard deviation of the training
 * items (a statistic constant there is left out), each method's centroid is the mean of its
 * training items, and an item is assigned to the method of the nearest centroid (Euclidean).
 * Accuracy is estimated leaving one case out: every case in turn is held out, the rule is built on
 * the other cases and predicts the method of each held-out item. An item tied between k nearest
 * centroids counts 1/k if its method is among them.
 *
 * Chance is 1 / (number of methods). The p-value is a permutation test (Good 2005, "Permutation,
 * Parametric and Bootstrap Tests of Hypotheses", 3rd ed., Springer, ch. 3): within each case the
 * method labels are shuffled (Fisher–Yates, MT19937 stream "blinding-strength" from the study seed,
 * app/blinding/streams.ts), the whole leave-one-case-out accuracy is recomputed, and
 * p = (1 + #{permuted accuracy ≥ observed}) / (1 + permutations).
 *
 * The same is done for each statistic alone, which tells which one gives the methods away.
 * A warning is raised when the accuracy with all statistics is above chance with p ≤ alpha
 * (default 0.05), or when one statistic alone is, with p ≤ alpha / (number of statistics)
 * (Bonferroni; a single clear giveaway such as a different matrix size is diluted among ten
 * statistics in the joint rule).
 */
import { shuffleInPlace } from '../blinding/mt19937.ts';
import { streamFor } from '../blinding/streams.ts';
import { ITEM_STATISTIC_LABELS } from './item-statistics.ts';
import type { ItemStatistics } from './item-statistics.ts';

export interface ItemFeatures {
  case: string;
  method: string;
  stats: ItemStatistics;
}

export type StatisticName = keyof ItemStatistics;

export interface BlindingStrengthOptions {
  /** The study seed; permutations draw from the stream "blinding-strength". */
  seed: number;
  /** Label permutations for the p-value (default 999). */
  permutations?: number;
  /** Warn at p ≤ alpha (default 0.05). */
  alpha?: number;
}

export interface StatisticFinding {
  statistic: StatisticName;
  label: string;
  /** Leave-one-case-out accuracy with this statistic alone. */
  accuracy: number;
  pValue: number;
  /** Mean of the statistic per method (as computed, before standardization). */
  byMethod: Record<string, number>;
}

export interface BlindingStrength {
  items: number;
  cases: number;
  methods: string[];
  statistics: StatisticName[];
  /** Leave-one-case-out nearest-centroid accuracy with every statistic. */
  accuracy: number;
  chance: number;
  pValue: number;
  permutations: number;
  /** Per statistic, most revealing first. */
  perStatistic: StatisticFinding[];
  /** The statistic that best tells the methods apart, when the check warns; else null. */
  givesAway: StatisticName | null;
  /** A message for the coordinator when the methods are easy to tell apart; else null. */
  warning: string | null;
  conventions: string[];
}

export const BLINDING_STREAM = 'blinding-strength';
const DEFAULT_PERMUTATIONS = 999;

const compare = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);

/**
 * Leave-one-case-out nearest-centroid accuracy. `x[i]` holds item i's features, `label[i]` its
 * method index (0..methods-1), `caseOf[i]` its case index.
 *
 * Every fold's training statistics are the totals minus the held-out case's share, so the whole
 * estimate costs O(items × methods × features). Standardizing by the training standard deviation
 * sd_k and comparing with standardized centroids is the same as the distance
 * Σ_k (x_k − centroid_k)² / sd_k², which is what is computed. Values are centred on the overall
 * mean first, which keeps the one-pass variances accurate.
 */
export function leaveOneCaseOutAccuracy(x: number[][], label: ArrayLike<number>, caseOf: ArrayLike<number>, cases: number, methods: number): number {
  return leaveOneCaseOut(x, caseOf, cases)(label, methods);
}

/**
 * leaveOneCaseOutAccuracy with everything that does not depend on the labels (the centring, the
 * per-case totals and each fold's inverse variances) worked out once, for the many relabellings
 * of a permutation test; each call then costs only the method sums and the classification.
 */
export function leaveOneCaseOut(x: number[][], caseOf: ArrayLike<number>, cases: number): (label: ArrayLike<number>, methods: number) => number {
  const n = x.length;
  if (n === 0) return () => Number.NaN;
  const f = x[0].length;
  const centre = new Float64Array(f);
  for (const row of x) for (let k = 0; k < f; k++) centre[k] += row[k] / n;
  const v = x.map((row) => Float64Array.from(row, (value, k) => value - centre[k]));
  // Totals, and each case's part: Σv, Σv² per feature.
  const sum = new Float64Array(f);
  const squares = new Float64Array(f);
  const caseSum = new Float64Array(cases * f);
  const caseSquares = new Float64Array(cases * f);
  const caseCount = new Float64Array(cases);
  for (let i = 0; i < n; i++) {
    const c = caseOf[i];
    caseCount[c]++;
    for (let k = 0; k < f; k++) {
      const value = v[i][k];
      sum[k] += value;
      squares[k] += value * value;
      caseSum[c * f + k] += value;
      caseSquares[c * f + k] += value * value;
    }
  }
  // Each fold's inverse training variances.
  const inverseVariance = new Float64Array(cases * f);
  for (let held = 0; held < cases; held++) {
    const train = n - caseCount[held];
    if (train === 0) continue;
    for (let k = 0; k < f; k++) {
      const mean = (sum[k] - caseSum[held * f + k]) / train;
      const meanSquare = (squares[k] - caseSquares[held * f + k]) / train;
      const variance = meanSquare - mean * mean;
      // A feature constant over the training cases is left out (rounding may leave a trace of variance).
      inverseVariance[held * f + k] = variance > 1e-12 * meanSquare ? 1 / variance : 0;
    }
  }

  return (label, methods) => {
    // Σv and count per method, in total and within each case.
    const methodSum = new Float64Array(methods * f);
    const methodCount = new Float64Array(methods);
    const caseMethodSum = new Float64Array(cases * methods * f);
    const caseMethodCount = new Float64Array(cases * methods);
    for (let i = 0; i < n; i++) {
      const c = caseOf[i];
      const m = label[i];
      methodCount[m]++;
      caseMethodCount[c * methods + m]++;
      for (let k = 0; k < f; k++) {
        const value = v[i][k];
        methodSum[m * f + k] += value;
        caseMethodSum[(c * methods + m) * f + k] += value;
      }
    }
    const centroid = new Float64Array(methods * f);
    const members = new Float64Array(methods);
    let credit = 0;
    for (let held = 0; held < cases; held++) {
      const train = n - caseCount[held];
      if (train === 0 || caseCount[held] === 0) continue;
      for (let m = 0; m < methods; m++) {
        members[m] = methodCount[m] - caseMethodCount[held * methods + m];
        for (let k = 0; k < f; k++) {
          centroid[m * f + k] = members[m] > 0 ? (methodSum[m * f + k] - caseMethodSum[(held * methods + m) * f + k]) / members[m] : 0;
        }
      }
      for (let i = 0; i < n; i++) {
        if (caseOf[i] !== held) continue;
        let best = Infinity;
        let tied = 0;
        let hit = false;
        for (let m = 0; m < methods; m++) {
          if (members[m] === 0) continue;
          let d = 0;
          for (let k = 0; k < f; k++) d += (v[i][k] - centroid[m * f + k]) ** 2 * inverseVariance[held * f + k];
          if (d < best) {
            best = d;
            tied = 1;
            hit = m === label[i];
          } else if (d === best) {
            tied++;
            if (m === label[i]) hit = true;
          }
        }
        if (hit) credit += 1 / tied;
      }
    }
    return credit / n;
  };
}

/**
 * Advice on the template settings that would hide a statistic (the `display` section of
 * app/study/template.ts: `matching`, `intensity`, `percentiles`).
 */
export function blindingAdvice(statistic: StatisticName): string {
  if (statistic === 'rows' || statistic === 'columns' || statistic === 'slices') {
    return 'The methods differ in matrix size: resample every method to the reference grid with display: {matching: reference-grid}.';
  }
  if (statistic === 'scale' || statistic.startsWith('q')) {
    return 'The methods differ in intensity distribution: normalize intensities for display with display: {intensity: percentile} ' +
      '(window from display.percentiles) or display: {intensity: match-reference}.';
  }
  return (
    `The methods differ in ${ITEM_STATISTIC_LABELS[statistic]}, often the very thing readers are asked to judge; no display setting hides it. ` +
    "Readers may learn to recognize a method's look: keep the reading order randomized, use sessions with a washout, and interpret method " +
    'comparisons knowing that blinding is partial. display: {intensity: percentile} or {intensity: match-reference} still removes what differs only in scale.'
  );
}

export function blindingStrength(items: readonly ItemFeatures[], options: BlindingStrengthOptions): BlindingStrength {
  const permutations = options.permutations ?? DEFAULT_PERMUTATIONS;
  const alpha = options.alpha ?? 0.05;
  // Items grouped by case, methods in order, so the permutation stream is the same on every run.
  const sorted = [...items].sort((a, b) => compare(a.case, b.case) || compare(a.method, b.method));
  const caseIds = [...new Set(sorted.map((i) => i.case))];
  const methods = [...new Set(sorted.map((i) => i.method))].sort(compare);
  const statistics = (Object.keys(ITEM_STATISTIC_LABELS) as StatisticName[]).filter((s) => sorted.length > 0 && sorted.every((i) => typeof i.stats[s] === 'number'));
  const caseOf = Int32Array.from(sorted, (i) => caseIds.indexOf(i.case));
  const label = Int32Array.from(sorted, (i) => methods.indexOf(i.method));
  const all = sorted.map((i) => statistics.map((s) => i.stats[s] as number));
  const single = statistics.map((_, k) => all.map((row) => [row[k]]));
  const allOf = leaveOneCaseOut(all, caseOf, caseIds.length);
  const singleOf = single.map((x) => leaveOneCaseOut(x, caseOf, caseIds.length));

  const observed = allOf(label, methods.length);
  const observedSingle = singleOf.map((of) => of(label, methods.length));
  let atLeast = 0;
  const atLeastSingle = new Array<number>(statistics.length).fill(0);
  const rng = streamFor(options.seed, BLINDING_STREAM);
  const permuted = Int32Array.from(label);
  const tolerance = 1e-12;
  for (let p = 0; p < permutations; p++) {
    for (let start = 0; start < sorted.length; ) {
      let end = start;
      while (end < sorted.length && caseOf[end] === caseOf[start]) end++;
      const labels = Array.from(label.subarray(start, end));
      shuffleInPlace(labels, rng);
      permuted.set(labels, start);
      start = end;
    }
    if (allOf(permuted, methods.length) >= observed - tolerance) atLeast++;
    singleOf.forEach((of, k) => {
      if (of(permuted, methods.length) >= observedSingle[k] - tolerance) atLeastSingle[k]++;
    });
  }
  const pOf = (count: number): number => (1 + count) / (1 + permutations);
  const chance = methods.length > 0 ? 1 / methods.length : Number.NaN;

  const perStatistic: StatisticFinding[] = statistics
    .map((s, k) => ({
      statistic: s,
      label: ITEM_STATISTIC_LABELS[s],
      accuracy: observedSingle[k],
      pValue: pOf(atLeastSingle[k]),
      byMethod: Object.fromEntries(
        methods.map((m, mi) => {
          const own = sorted.filter((_, i) => label[i] === mi);
          return [m, own.reduce((sum, i) => sum + (i.stats[s] as number), 0) / own.length];
        }),
      ),
    }))
    .sort((a, b) => b.accuracy - a.accuracy || a.pValue - b.pValue);

  const pValue = pOf(atLeast);
  const overall = permutations > 0 && observed > chance && pValue <= alpha;
  // A single statistic counts at alpha / (number of statistics) (Bonferroni), as ten are tried.
  const singleAlpha = alpha / Math.max(1, statistics.length);
  const revealing = perStatistic.filter((f) => permutations > 0 && f.accuracy > chance && f.pValue <= singleAlpha);
  const lead = revealing[0] ?? (overall && perStatistic[0]?.accuracy > chance ? perStatistic[0] : null);
  const givesAway = overall || revealing.length > 0 ? (lead?.statistic ?? null) : null;
  let warning: string | null = null;
  if (overall || revealing.length > 0) {
    const pct = (v: number): string => `${Math.round(100 * v)}%`;
    const opening = overall
      ? 'Readers could tell the methods apart from simple image statistics: a nearest-centroid rule, leaving each case out, names the method of ' +
        `${pct(observed)} of items (chance ${pct(chance)}, permutation p = ${formatP(pValue, permutations)}).`
      : `Readers could tell the methods apart from one simple image statistic: ${lead!.label} alone names the method of ${pct(lead!.accuracy)} ` +
        `of items, leaving each case out (chance ${pct(chance)}, permutation p = ${formatP(lead!.pValue, permutations)}, ` +
        `below ${alpha}/${statistics.length} for ${statistics.length} statistics tried).`;
    warning =
      opening +
      (lead
        ? ` Most revealing: ${lead.label} (${pct(lead.accuracy)} alone; per method ${methods.map((m) => `${m} ${formatValue(lead.byMethod[m])}`).join(', ')}). ` +
          blindingAdvice(lead.statistic)
        : '');
  }
  return {
    items: sorted.length,
    cases: caseIds.length,
    methods,
    statistics,
    accuracy: observed,
    chance,
    pValue,
    permutations,
    perStatistic,
    givesAway,
    warning,
    conventions: [
      "Item statistics on intensities mapped to each item's display window (default: its 0th to 99.5th percentile, as the kit shows it): " +
        "background noise (standard deviation below Otsu's threshold), gradient energy, intensity quantiles 5/25/50/75/95%, matrix size.",
      'Leave-one-case-out nearest-centroid accuracy (statistics standardized on the training cases), chance = 1 / number of methods.',
      `Permutation p-value: method labels shuffled within each case, ${permutations} permutations, MT19937 stream "${BLINDING_STREAM}" from the study seed; ` +
        `warning at p <= ${alpha} for all statistics together, or p <= ${alpha}/${statistics.length} for one alone (Bonferroni).`,
    ],
  };
}

function formatP(p: number, permutations: number): string {
  return p <= 1 / (1 + permutations) ? `${p.toPrecision(2)} (the smallest possible with ${permutations} permutations)` : p.toPrecision(2);
}

function formatValue(v: number): string {
  return Math.abs(v) >= 100 || Number.isInteger(v) ? String(Math.round(v)) : v.toPrecision(3);
}

/** The check as plain text for `veil check`, `veil build` and the study report. */
export function formatBlindingStrength(r: BlindingStrength): string {
  const pct = (v: number): string => `${(100 * v).toFixed(0)}%`;
  const lines = [
    `Blinding strength: ${r.items} items, ${r.cases} cases, methods ${r.methods.join(', ')}.`,
    `Nearest-centroid accuracy, leaving each case out: ${pct(r.accuracy)} (chance ${pct(r.chance)}), permutation p = ${formatP(r.pValue, r.permutations)}.`,
    'Per statistic (accuracy alone, p):',
    ...r.perStatistic.map((f) => `  ${f.label.padEnd(40)} ${pct(f.accuracy).padStart(4)}  p = ${formatP(f.pValue, r.permutations)}`),
    r.warning ? `WARNING: ${r.warning}` : 'No statistic tells the methods apart beyond chance.',
    'Conventions:',
    ...r.conventions.map((c) => `  - ${c}`),
  ];
  return lines.join('\n') + '\n';
}
