/**
 * Active time on an item, as pure arithmetic over timestamps (ms), so it can be tested without a
 * browser. The clock counts only while `counting` (window focused and visible, not paused), and
 * a stretch without any input counts at most `idleMs`: a reader who walks away is not timed.
 */
/** Our choice, not a standard: long enough to study one slice without touching anything. */
export const IDLE_MS = 120_000;

export class ActiveClock {
  private total = 0;
  private last = 0;
  private counting = false;

  constructor(private readonly idleMs = IDLE_MS) {}

  start(now: number, counting: boolean): void {
    this.total = 0;
    this.last = now;
    this.counting = counting;
  }

  /** Any input from the reader. */
  activity(now: number): void {
    if (this.counting) this.total += Math.min(Math.max(0, now - this.last), this.idleMs);
    this.last = now;
  }

  setCounting(counting: boolean, now: number): void {
    if (counting === this.counting) return;
    this.activity(now);
    this.counting = counting;
  }

  ms(now: number): number {
    return this.total + (this.counting ? Math.min(Math.max(0, now - this.last), this.idleMs) : 0);
  }
}
