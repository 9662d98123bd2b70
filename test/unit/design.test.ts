import { describe, expect, it } from 'vitest';
import { readingSchedule } from '../../app/blinding/design.ts';

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

  it('gives every reader every (case, method) item exactly once, split into the sessions', () => {
    const s = readingSchedule(7, ['R1', 'R2', 'R3'], cases, methods, 2);
    for (const r of ['R1', 'R2', 'R3']) {
      const mine = s.filter((x) => x.reader === r);
      expect(new Set(mine.map((x) => `${x.caseId}/${x.methodId}`)).size).toBe(15);
      expect(mine.map((x) => x.position).sort((a, b) => a - b)).toEqual([...Array(15).keys()]);
      expect(mine.filter((x) => x.session === 1).length).toBe(8);
      expect(mine.filter((x) => x.session === 2).length).toBe(7);
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
