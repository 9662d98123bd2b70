/**
 * Rank correlations between an image metric and reader scores.
 *
 * Spearman's ρ (Spearman 1904, "The proof and measurement of association between two things",
 * American Journal of Psychology 15(1):72–101): Pearson's correlation of the ranks, tied values
 * sharing their average rank (`scipy.stats.spearmanr`):
 *
 *   ρ = Σ (r_i − r̄)(s_i − s̄) / sqrt(Σ (r_i − r̄)² Σ (s_i − s̄)²)
 *
 * Kendall's τ_b (Kendall 1945, "The treatment of ties in ranking problems", Biometrika
 * 33(3):239–251), which corrects for ties in either variable (`scipy.stats.kendalltau`, variant 'b'):
 *
 *   τ_b = (C − D) / sqrt((n0 − n1)(n0 − n2)),  n0 = n(n−1)/2,  n1 = Σ t_x(t_x−1)/2,  n2 = Σ t_y(t_y−1)/2
 *
 * with C and D the concordant and discordant pairs and t_x, t_y the sizes of the tie groups.
 * D is counted in O(n log n) as the inversions of y after sorting by (x, y) (Knight 1966, "A
 * computer method for calculating Kendall's tau with ungrouped data", JASA 61(314):436–439; here
 * with a Fenwick tree over the ranks of y), and C − D = n0 − n1 − n2 + n3 − 2D with n3 the pairs
 * tied in both. Either is NaN when a variable is constant (or n < 2).
 *
 * `RankPairs` prepares a set of pairs once and computes both for any multiplicities, which is what
 * a case bootstrap needs (./linkage.ts).
 */

/** Average ranks, 1-based (`scipy.stats.rankdata(method='average')`). */
export function averageRanks(values: ArrayLike<number>): Float64Array {
  const n = values.length;
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => values[a] - values[b]);
  const ranks = new Float64Array(n);
  for (let i = 0; i < n; ) {
    let j = i;
    while (j + 1 < n && values[order[j + 1]] === values[order[i]]) j++;
    const rank = (i + j) / 2 + 1;
    for (let k = i; k <= j; k++) ranks[order[k]] = rank;
    i = j + 1;
  }
  return ranks;
}

/**
 * A fixed set of n (x, y) pairs, sorted once, whose ρ and τ_b can then be computed for any
 * multiplicities w (pair i counted w_i times, as a bootstrap resample counts it) in O(n log n),
 * exactly as on the expanded sample: a pair drawn twice is two tied observations.
 */
export class RankPairs {
  readonly n: number;
  private readonly byX: Int32Array; // indices sorted by (x, y)
  private readonly byY: Int32Array; // indices sorted by y
  private readonly newX: Uint8Array; // in byX order: 1 where x differs from the previous
  private readonly newXY: Uint8Array; // in byX order: 1 where (x, y) differs from the previous
  private readonly newY: Uint8Array; // in byY order: 1 where y differs from the previous
  private readonly yRank: Int32Array; // dense rank of y, 0-based, per pair
  private readonly distinctY: number;
  private readonly rx: Float64Array;
  private readonly ry: Float64Array;
  private readonly tree: Float64Array;

  constructor(x: ArrayLike<number>, y: ArrayLike<number>) {
    if (x.length !== y.length) throw new RangeError('rank correlation: x and y differ in length');
    const n = (this.n = x.length);
    this.byX = Int32Array.from({ length: n }, (_, i) => i).sort((a, b) => x[a] - x[b] || y[a] - y[b]);
    this.byY = Int32Array.from({ length: n }, (_, i) => i).sort((a, b) => y[a] - y[b]);
    this.newX = new Uint8Array(n);
    this.newXY = new Uint8Array(n);
    this.newY = new Uint8Array(n);
    this.yRank = new Int32Array(n);
    let rank = -1;
    for (let k = 0; k < n; k++) {
      const i = this.byX[k];
      const p = k > 0 ? this.byX[k - 1] : -1;
      this.newX[k] = p < 0 || x[i] !== x[p] ? 1 : 0;
      this.newXY[k] = this.newX[k] || y[i] !== y[p] ? 1 : 0;
      const j = this.byY[k];
      const q = k > 0 ? this.byY[k - 1] : -1;
      this.newY[k] = q < 0 || y[j] !== y[q] ? 1 : 0;
      if (this.newY[k]) rank++;
      this.yRank[j] = rank;
    }
    this.distinctY = rank + 1;
    this.rx = new Float64Array(n);
    this.ry = new Float64Array(n);
    this.tree = new Float64Array(this.distinctY + 1);
  }

  /** Average ranks (1-based) of the expanded sample along one sort order, and Σ t(t−1)/2 over its tie groups. */
  private static ranks(order: Int32Array, isNew: Uint8Array, w: ArrayLike<number>, out: Float64Array): number {
    let before = 0;
    let tiedPairs = 0;
    for (let k = 0; k < order.length; ) {
      let end = k + 1;
      while (end < order.length && !isNew[end]) end++;
      let group = 0;
      for (let g = k; g < end; g++) group += w[order[g]];
      const average = before + (group + 1) / 2;
      for (let g = k; g < end; g++) out[order[g]] = average;
      tiedPairs += (group * (group - 1)) / 2;
      before += group;
      k = end;
    }
    return tiedPairs;
  }

  private static tiedPairs(order: Int32Array, isNew: Uint8Array, w: ArrayLike<number>): number {
    let pairs = 0;
    let group = 0;
    for (let k = 0; k < order.length; k++) {
      if (isNew[k]) {
        pairs += (group * (group - 1)) / 2;
        group = 0;
      }
      group += w[order[k]];
    }
    return pairs + (group * (group - 1)) / 2;
  }

  spearman(w: ArrayLike<number>): number {
    const { n, rx, ry } = this;
    RankPairs.ranks(this.byX, this.newX, w, rx);
    RankPairs.ranks(this.byY, this.newY, w, ry);
    let total = 0;
    let mx = 0;
    let my = 0;
    for (let i = 0; i < n; i++) {
      total += w[i];
      mx += w[i] * rx[i];
      my += w[i] * ry[i];
    }
    if (total < 2) return Number.NaN;
    mx /= total;
    my /= total;
    let sxy = 0;
    let sxx = 0;
    let syy = 0;
    for (let i = 0; i < n; i++) {
      if (w[i] === 0) continue;
      const dx = rx[i] - mx;
      const dy = ry[i] - my;
      sxy += w[i] * dx * dy;
      sxx += w[i] * dx * dx;
      syy += w[i] * dy * dy;
    }
    return sxy / Math.sqrt(sxx * syy);
  }

  kendallTauB(w: ArrayLike<number>): number {
    const { n, byX, yRank, tree } = this;
    let total = 0;
    for (let i = 0; i < n; i++) total += w[i];
    if (total < 2) return Number.NaN;
    const n0 = (total * (total - 1)) / 2;
    const n1 = RankPairs.tiedPairs(byX, this.newX, w);
    const n3 = RankPairs.tiedPairs(byX, this.newXY, w);
    const n2 = RankPairs.tiedPairs(this.byY, this.newY, w);
    if (n1 === n0 || n2 === n0) return Number.NaN;
    // Discordant pairs: in (x, y) order, the weight met earlier with a larger y (a Fenwick tree over y ranks).
    tree.fill(0);
    let inserted = 0;
    let discordant = 0;
    for (let k = 0; k < n; k++) {
      const i = byX[k];
      if (w[i] === 0) continue;
      let atMost = 0;
      for (let j = yRank[i] + 1; j > 0; j -= j & -j) atMost += tree[j];
      discordant += w[i] * (inserted - atMost);
      for (let j = yRank[i] + 1; j < tree.length; j += j & -j) tree[j] += w[i];
      inserted += w[i];
    }
    return (n0 - n1 - n2 + n3 - 2 * discordant) / Math.sqrt((n0 - n1) * (n0 - n2));
  }
}

export function spearmanRho(x: ArrayLike<number>, y: ArrayLike<number>): number {
  return new RankPairs(x, y).spearman(new Float64Array(x.length).fill(1));
}

export function kendallTauB(x: ArrayLike<number>, y: ArrayLike<number>): number {
  return new RankPairs(x, y).kendallTauB(new Float64Array(x.length).fill(1));
}
