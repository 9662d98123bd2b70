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
 * computer method for calculating Kendall's tau with ungrouped data", JASA 61(314):436–439), and
 * C − D = n0 − n1 − n2 + n3 − 2D with n3 the pairs tied in both. Either is NaN when a variable is
 * constant (or n < 2).
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

function pearson(x: ArrayLike<number>, y: ArrayLike<number>): number {
  const n = x.length;
  let mx = 0;
  let my = 0;
  for (let i = 0; i < n; i++) {
    mx += x[i];
    my += y[i];
  }
  mx /= n;
  my /= n;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i] - mx;
    const dy = y[i] - my;
    sxy += dx * dy;
    sxx += dx * dx;
    syy += dy * dy;
  }
  return sxy / Math.sqrt(sxx * syy);
}

export function spearmanRho(x: ArrayLike<number>, y: ArrayLike<number>): number {
  if (x.length !== y.length) throw new RangeError('spearmanRho: x and y differ in length');
  if (x.length < 2) return Number.NaN;
  return pearson(averageRanks(x), averageRanks(y));
}

/** Pairs within runs of equal keys (keys sorted so that equal ones are adjacent). */
function tiedPairs(n: number, same: (i: number) => boolean): number {
  let pairs = 0;
  let run = 1;
  for (let i = 1; i <= n; i++) {
    if (i < n && same(i)) run++;
    else {
      pairs += (run * (run - 1)) / 2;
      run = 1;
    }
  }
  return pairs;
}

/** Inversions (i < j with a[i] > a[j], strictly) of `a`, counted by merge sort; sorts `a`. */
function countInversions(a: Float64Array): number {
  const n = a.length;
  let buffer: Float64Array = new Float64Array(n);
  let src: Float64Array = a;
  let inversions = 0;
  for (let width = 1; width < n; width *= 2) {
    for (let lo = 0; lo < n; lo += 2 * width) {
      const mid = Math.min(lo + width, n);
      const hi = Math.min(lo + 2 * width, n);
      let i = lo;
      let j = mid;
      let k = lo;
      while (i < mid && j < hi) {
        if (src[j] < src[i]) {
          inversions += mid - i;
          buffer[k++] = src[j++];
        } else buffer[k++] = src[i++];
      }
      while (i < mid) buffer[k++] = src[i++];
      while (j < hi) buffer[k++] = src[j++];
    }
    [src, buffer] = [buffer, src];
  }
  if (src !== a) a.set(src);
  return inversions;
}

export function kendallTauB(x: ArrayLike<number>, y: ArrayLike<number>): number {
  const n = x.length;
  if (n !== y.length) throw new RangeError('kendallTauB: x and y differ in length');
  if (n < 2) return Number.NaN;
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => x[a] - x[b] || y[a] - y[b]);
  const xs = Float64Array.from(order, (i) => x[i]);
  const ys = Float64Array.from(order, (i) => y[i]);
  const n0 = (n * (n - 1)) / 2;
  const n1 = tiedPairs(n, (i) => xs[i] === xs[i - 1]);
  const n3 = tiedPairs(n, (i) => xs[i] === xs[i - 1] && ys[i] === ys[i - 1]);
  const discordant = countInversions(ys); // sorts ys
  const n2 = tiedPairs(n, (i) => ys[i] === ys[i - 1]);
  if (n1 === n0 || n2 === n0) return Number.NaN;
  return (n0 - n1 - n2 + n3 - 2 * discordant) / Math.sqrt((n0 - n1) * (n0 - n2));
}
