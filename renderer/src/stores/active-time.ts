/**
 * Active seconds on an item (see ./active-clock.ts): the clock runs only while the page is
 * visible and focused and the reader has not paused, and stops counting after a long stretch
 * without input.
 */
import { ActiveClock } from './active-clock.ts';

const ACTIVITY = ['keydown', 'pointerdown', 'pointermove', 'wheel'] as const;

export class ActiveTimer {
  private readonly clock = new ActiveClock();
  private paused = false;
  private listening = false;
  private readonly onChange = () => this.clock.setCounting(this.active(), performance.now());
  private readonly onActivity = () => this.clock.activity(performance.now());

  start(): void {
    this.paused = false;
    this.clock.start(performance.now(), this.active());
    if (this.listening) return;
    this.listening = true;
    document.addEventListener('visibilitychange', this.onChange);
    window.addEventListener('focus', this.onChange);
    window.addEventListener('blur', this.onChange);
    for (const e of ACTIVITY) window.addEventListener(e, this.onActivity, { passive: true, capture: true });
  }

  private active(): boolean {
    return !this.paused && document.visibilityState === 'visible' && document.hasFocus();
  }

  pause(paused: boolean): void {
    this.paused = paused;
    this.onChange();
  }

  seconds(): number {
    return Math.round(this.clock.ms(performance.now()) / 100) / 10;
  }

  stop(): void {
    if (!this.listening) return;
    this.listening = false;
    document.removeEventListener('visibilitychange', this.onChange);
    window.removeEventListener('focus', this.onChange);
    window.removeEventListener('blur', this.onChange);
    for (const e of ACTIVITY) window.removeEventListener(e, this.onActivity, { capture: true });
  }
}
