/**
 * Reading time per item, by method and session.
 *
 * An item's time is the active seconds the reading room recorded for it (pauses excluded); with
 * several questions per item the seconds are stored once per item and counted once here. Per
 * (method, session): n items, median and quartiles (type 7, Hyndman & Fan 1996) and mean with
 * sample SD. Items without a recorded time (simulated readers, older results) are left out and
 * counted in `missing`.
 */
import { quantileSorted } from '../bootstrap.ts';
import type { ReadingTimeRow } from './comparison-types.ts';
export type { ReadingTimeRow };

export interface TimedItem { method: string; session: number; reader: string; case: string; seconds: number | null }

export function readingTimes(items: readonly TimedItem[]): ReadingTimeRow[] {
  const groups = new Map<string, { method: string; session: number; values: number[]; missing: number }>();
  for (const it of items) {
    const key = JSON.stringify([it.method, it.session]);
    let g = groups.get(key);
    if (!g) groups.set(key, (g = { method: it.method, session: it.session, values: [], missing: 0 }));
    if (it.seconds === null || !Number.isFinite(it.seconds)) g.missing++;
    else g.values.push(it.seconds);
  }
  return [...groups.values()]
    .sort((a, b) => (a.method < b.method ? -1 : a.method > b.method ? 1 : a.session - b.session))
    .map((g) => {
      const n = g.values.length;
      if (n === 0) return { method: g.method, session: g.session, n, missing: g.missing, median: null, q1: null, q3: null, mean: null, sd: null };
      const sorted = Float64Array.from(g.values).sort();
      const mean = g.values.reduce((a, b) => a + b, 0) / n;
      const sd = n > 1 ? Math.sqrt(g.values.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1)) : null;
      return {
        method: g.method, session: g.session, n, missing: g.missing,
        median: quantileSorted(sorted, 0.5), q1: quantileSorted(sorted, 0.25), q3: quantileSorted(sorted, 0.75), mean, sd,
      };
    });
}
