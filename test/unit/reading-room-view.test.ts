/**
 * Pure parts of the reading room: the active-time clock (focus, pause, idle) and the automatic
 * window's percentiles, the latter against NumPy (test/reference/auto-window/).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ActiveClock } from '../../renderer/src/stores/active-clock.ts';
import { histogram16, histogramPercentile, percentileWindow } from '../../renderer/src/viewer/percentile-window.ts';

describe('active time on an item', () => {
  it('counts only focused, unpaused time, and at most the idle limit between two inputs', () => {
    const c = new ActiveClock(10_000);
    c.start(0, true);
    c.activity(4_000);
    expect(c.ms(4_000)).toBe(4_000);
    // The window loses focus for 20 s: none of it counts.
    c.setCounting(false, 5_000);
    c.setCounting(true, 25_000);
    expect(c.ms(25_000)).toBe(5_000);
    // The reader walks away for a minute: only the idle limit counts.
    c.activity(85_000);
    expect(c.ms(85_000)).toBe(15_000);
    c.activity(86_000);
    expect(c.ms(87_500)).toBe(17_500);
    // Paused (counting off), then the item is saved.
    c.setCounting(false, 88_000);
    expect(c.ms(200_000)).toBe(18_000);
    c.start(200_000, true);
    expect(c.ms(201_000)).toBe(1_000);
  });
});

describe('automatic window', () => {
  const ref = JSON.parse(readFileSync(join(import.meta.dirname, '..', 'reference', 'auto-window', 'percentiles.json'), 'utf8')) as
    { tool: string; cases: { name: string; values: number[]; p1: number; p50: number; p99: number }[] };

  it(`gives nearest-rank percentiles equal to ${ref.tool}`, () => {
    for (const c of ref.cases) {
      const hist = histogram16(Uint16Array.from(c.values));
      expect([histogramPercentile(hist, 1), histogramPercentile(hist, 50), histogramPercentile(hist, 99)], c.name).toEqual([c.p1, c.p50, c.p99]);
    }
  });

  it('windows from the 1st to the 99th percentile of every view together', () => {
    const c = ref.cases.find((x) => x.name === 'background-and-body')!;
    const all = Uint16Array.from(c.values);
    const half = all.length >> 1;
    expect(percentileWindow([all.subarray(0, half), all.subarray(half)])).toEqual({ center: (c.p1 + c.p99) / 2, width: c.p99 - c.p1 });
  });
});
