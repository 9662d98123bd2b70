import { describe, expect, it } from 'vitest';
import { readingSchedule, summarizeDesign } from '../../app/blinding/design.ts';

const cases = ['c1', 'c2', 'c3', 'c4', 'c5'];
const methods = ['m-a', 'm-b', 'm-c'];

describe('reading schedule', () => {
  it('is reproducible from the seed', () => {
    expect(readingSchedule(42, ['R1', 'R2'], cases, methods, 2)).toEqual(readingSchedule(42, ['R1', 'R2'], cases, methods, 2));
  });

  it('differs between readers and between seeds', () => {
    const s = readingSchedule(42, ['R1', 'R2'], cases, methods, 1);
    const order = (r: string, sched = s) => sched.filter((x) => x.reader === r).map((x) => `${x.caseId}/${x.methodId}`);
    expect(order('R1')).not.toEqual(order('R2'));
    expect(order('R1')).not.toEqual(order('R1', readingSchedule(43, ['R1', 'R2'], cases, methods, 1)));
  });

  it('gives every reader every (case, method) item exactly once, each case at most once a session when sessions >= methods', () => {
    const s = readingSchedule(7, ['R1', 'R2', 'R3'], cases, methods, 3);
    for (const r of ['R1', 'R2', 'R3']) {
      const mine = s.filter((x) => x.reader === r);
      expect(new Set(mine.map((x) => `${x.caseId}/${x.methodId}`)).size).toBe(15);
      expect(mine.map((x) => x.position)).toEqual([...Array(15).keys()]);
      for (const session of [1, 2, 3]) {
        const inSession = mine.filter((x) => x.session === session);
        expect(inSession).toHaveLength(5);
        expect(new Set(inSession.map((x) => x.caseId)).size).toBe(5);
        // Sessions are consecutive blocks of the reading order.
        expect(Math.max(...inSession.map((x) => x.position)) - Math.min(...inSession.map((x) => x.position))).toBe(4);
      }
    }
  });

  it('rotates methods across sessions (Latin square): every method is read in every session equally often', () => {
    const summary = summarizeDesign(readingSchedule(3, ['R1', 'R2', 'R3'], cases, methods, 3), 3, 'MT19937', 3, 'single');
    for (const m of methods) expect(summary.methodsBySession[m]).toEqual([5, 5, 5]);
    expect(summary.perSession).toEqual({ R1: [5, 5, 5], R2: [5, 5, 5], R3: [5, 5, 5] });
    expect(summary.minSameCaseGap).toBe(Infinity);
    for (const m of methods) expect(Math.abs(summary.meanPosition[m] - 0.5)).toBeLessThan(0.2);
  });

  it('does not put any method systematically early or late in a session', () => {
    const many = ['c1', 'c2', 'c3', 'c4', 'c5', 'c6', 'c7', 'c8', 'c9', 'c10', 'c11', 'c12'];
    const summary = summarizeDesign(readingSchedule(5, ['R1', 'R2', 'R3', 'R4'], many, methods, 1), 5, 'MT19937', 1, 'single');
    for (const m of methods) expect(Math.abs(summary.meanPosition[m] - 0.5)).toBeLessThan(0.08);
  });

  it('never puts two items of one case next to each other when a session must hold several', () => {
    for (const seed of [1, 2, 3, 4, 5, 6, 7, 8]) {
      const s = readingSchedule(seed, ['R1', 'R2'], cases, ['m-a', 'm-b', 'm-c', 'm-d'], 1);
      const summary = summarizeDesign(s, seed, 'MT19937', 1, 'single');
      expect(summary.minSameCaseGap).toBeGreaterThanOrEqual(2);
      for (const r of ['R1', 'R2']) {
        const order = s.filter((x) => x.reader === r).sort((a, b) => a.position - b.position);
        for (let i = 1; i < order.length; i++) expect(order[i].caseId).not.toBe(order[i - 1].caseId);
      }
    }
  });

  it('side-by-side: every method pair of every case once, left and right balanced per reader', () => {
    const s = readingSchedule(21, ['R1', 'R2'], cases, methods, 2, 'side-by-side');
    for (const r of ['R1', 'R2']) {
      const mine = s.filter((x) => x.reader === r);
      expect(mine).toHaveLength(15); // 5 cases x 3 pairs
      const pairs = new Set(mine.map((x) => `${x.caseId}/${[x.methodId, x.rightMethodId].sort().join('+')}`));
      expect(pairs.size).toBe(15);
      for (const [a, b] of [['m-a', 'm-b'], ['m-a', 'm-c'], ['m-b', 'm-c']]) {
        const aLeft = mine.filter((x) => x.methodId === a && x.rightMethodId === b).length;
        const bLeft = mine.filter((x) => x.methodId === b && x.rightMethodId === a).length;
        expect(aLeft + bLeft).toBe(5);
        expect(Math.abs(aLeft - bLeft)).toBe(1);
      }
    }
  });

  it('keeps a reader\'s order when another reader is added', () => {
    const a = readingSchedule(9, ['R1'], cases, methods, 1).map((x) => `${x.caseId}/${x.methodId}`);
    const b = readingSchedule(9, ['R1', 'R2'], cases, methods, 1).filter((x) => x.reader === 'R1').map((x) => `${x.caseId}/${x.methodId}`);
    expect(b).toEqual(a);
  });

  it('draws opaque ids that are unique and say nothing of case or method', () => {
    const s = readingSchedule(11, ['R1', 'R2'], cases, methods, 1);
    const ids = s.map((x) => x.itemId);
    expect(new Set(ids).size).toBe(ids.length);
    for (const x of s) {
      expect(x.itemId).toMatch(/^[0-9a-hjkmnp-tv-z]{10}$/);
      expect(x.itemId).not.toContain(x.caseId);
    }
  });
});
