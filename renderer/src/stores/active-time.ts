/**
 * Active seconds on an item: the clock runs only while the page is visible and focused.
 */
export class ActiveTimer {
  private total = 0;
  private since: number | null = null;
  private readonly onChange = () => this.sync();

  start(): void {
    this.total = 0;
    this.since = null;
    document.addEventListener('visibilitychange', this.onChange);
    window.addEventListener('focus', this.onChange);
    window.addEventListener('blur', this.onChange);
    this.sync();
  }

  private active(): boolean {
    return document.visibilityState === 'visible';
  }

  private sync(): void {
    const now = performance.now();
    if (this.since !== null) this.total += now - this.since;
    this.since = this.active() ? now : null;
  }

  seconds(): number {
    this.sync();
    return Math.round(this.total / 100) / 10;
  }

  stop(): void {
    document.removeEventListener('visibilitychange', this.onChange);
    window.removeEventListener('focus', this.onChange);
    window.removeEventListener('blur', this.onChange);
  }
}
