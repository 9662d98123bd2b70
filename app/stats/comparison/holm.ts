/**
 * Holm's step-down adjustment of p-values for multiple comparisons (family-wise error rate).
 *
 * Holm, S. (1979). A simple sequentially rejective multiple test procedure. Scandinavian Journal
 *   of Statistics, 6(2), 65–70.
 *
 * With the m p-values sorted ascending p_(1) ≤ … ≤ p_(m):
 *
 *   p̃_(i) = min(1, max_{j ≤ i} (m − j + 1) p_(j))
 *
 * (the running maximum keeps the adjusted values monotone). Null p-values are left out of the
 * family and stay null. Checked against statsmodels multipletests(method='holm').
 */
export function holmAdjust(p: readonly (number | null)[]): (number | null)[] {
  const idx = p.map((v, i) => [v, i] as const).filter((e): e is readonly [number, number] => e[0] !== null && Number.isFinite(e[0]));
  idx.sort((a, b) => a[0] - b[0]);
  const m = idx.length;
  const out: (number | null)[] = p.map(() => null);
  let running = 0;
  idx.forEach(([v, i], j) => {
    running = Math.max(running, Math.min(1, (m - j) * v));
    out[i] = running;
  });
  return out;
}
