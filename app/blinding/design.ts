/**
 * The reading design: which items each reader reads, in which session and order.
 * Thin first version: every (case, method) item once per reader, in a shuffled order drawn from
 * the reader's own stream, split into `sessions` consecutive blocks of near-equal size.
 */
import { shuffleInPlace } from './mt19937.ts';
import { drawOpaqueIds, streamFor } from './streams.ts';

export interface ScheduledItem {
  itemId: string;
  reader: string;
  caseId: string;
  methodId: string;
  /** 1-based. */
  session: number;
  /** 0-based position in the reader's whole reading order. */
  position: number;
}

export function readingSchedule(seed: number, readers: string[], cases: string[], methods: string[], sessions: number): ScheduledItem[] {
  const perReader = cases.length * methods.length;
  const ids = drawOpaqueIds(seed, 'item-ids', perReader * readers.length);
  const out: ScheduledItem[] = [];
  readers.forEach((reader, r) => {
    const pairs: { caseId: string; methodId: string }[] = [];
    for (const caseId of cases) for (const methodId of methods) pairs.push({ caseId, methodId });
    shuffleInPlace(pairs, streamFor(seed, 'reading-order', reader));
    pairs.forEach((p, position) => {
      out.push({
        itemId: ids[r * perReader + position],
        reader,
        caseId: p.caseId,
        methodId: p.methodId,
        session: Math.floor((position * sessions) / perReader) + 1,
        position,
      });
    });
  });
  return out;
}
