/**
 * State of the reading room: the open kit, the item on screen, the draft scores, and the one
 * rule that matters most: the screen moves on only after the host confirms the answer is stored.
 */
import type { KitItemView, KitView, Progress } from '../../../app/api-contract.ts';
import { api } from '../api-client.ts';
import { ActiveTimer } from './active-time.ts';

export type Phase = 'loading' | 'reading' | 'saving' | 'done' | 'error';

class ReadingStore {
  kit = $state<KitView | null>(null);
  index = $state(0);
  draft = $state<Record<string, number>>({});
  focused = $state(0);
  phase = $state<Phase>('loading');
  message = $state<string | null>(null);
  progress = $state<Progress>({ answered: 0, total: 0, next: null });
  private readonly pixels = new Map<string, Promise<ArrayBuffer>>();
  private readonly timer = new ActiveTimer();

  get item(): KitItemView | null {
    return this.kit && this.phase !== 'done' ? this.kit.items[this.index] ?? null : null;
  }

  get complete(): boolean {
    return !!this.kit && this.kit.questions.every((q) => this.draft[q.id] != null);
  }

  async open(reader: string): Promise<void> {
    this.phase = 'loading';
    this.message = null;
    try {
      const kit = await api.openKit({ reader });
      this.kit = kit;
      this.progress = kit.progress;
      if (kit.progress.next === null) {
        this.phase = 'done';
      } else {
        this.show(kit.progress.next);
      }
    } catch (e) {
      this.phase = 'error';
      this.message = (e as Error).message;
    }
  }

  pixelsOf(itemId: string, view = 0): Promise<ArrayBuffer> {
    const key = `${itemId}~${view}`;
    let p = this.pixels.get(key);
    if (!p) {
      p = api.itemPixels({ reader: this.kit!.reader, itemId, view });
      p.catch(() => this.pixels.delete(key));
      this.pixels.set(key, p);
    }
    return p;
  }

  private show(index: number): void {
    const kit = this.kit!;
    this.index = index;
    this.draft = { ...(kit.answers[kit.items[index].id] ?? {}) };
    this.focused = 0;
    this.phase = 'reading';
    this.message = null;
    this.timer.start();
    // Prefetch the next unanswered item so it is on screen at once after submitting.
    const next = kit.items[index + 1];
    if (next) next.views.forEach((_, v) => void this.pixelsOf(next.id, v).catch(() => undefined));
    // Keep memory flat on long kits.
    const keep = (key: string) => key.startsWith(`${kit.items[index].id}~`) || (!!next && key.startsWith(`${next.id}~`));
    for (const key of this.pixels.keys()) if (!keep(key)) this.pixels.delete(key);
  }

  score(questionIndex: number, value: number): void {
    const q = this.kit?.questions[questionIndex];
    if (!q || this.phase !== 'reading' || value < 1 || value > q.points) return;
    this.draft = { ...this.draft, [q.id]: value };
    this.message = null;
    if (questionIndex < this.kit!.questions.length - 1) this.focused = questionIndex + 1;
  }

  scoreFocused(value: number): void {
    this.score(this.focused, value);
  }

  moveFocus(delta: number): void {
    if (!this.kit) return;
    const n = this.kit.questions.length;
    this.focused = (this.focused + delta + n) % n;
  }

  async submit(): Promise<void> {
    const kit = this.kit;
    const item = this.item;
    if (!kit || !item || this.phase !== 'reading') return;
    const missing = kit.questions.findIndex((q) => this.draft[q.id] == null);
    if (missing >= 0) {
      this.focused = missing;
      this.message = `Score "${kit.questions[missing].text}" before moving on.`;
      return;
    }
    this.phase = 'saving';
    try {
      const scores = { ...this.draft };
      const { progress } = await api.submitAnswer({ reader: kit.reader, itemId: item.id, scores, seconds: this.timer.seconds() });
      kit.answers[item.id] = scores;
      this.progress = progress;
      this.timer.stop();
      if (progress.next === null) this.phase = 'done';
      else this.show(progress.next > this.index ? progress.next : this.nextAfter(this.index));
    } catch (e) {
      this.phase = 'reading';
      this.message = `Not saved: ${(e as Error).message}. Your scores are still here; press Enter to try again.`;
    }
  }

  private nextAfter(index: number): number {
    const kit = this.kit!;
    for (let i = index + 1; i < kit.items.length; i++) if (!kit.answers[kit.items[i].id]) return i;
    return this.progress.next ?? index;
  }
}

export const reading = new ReadingStore();
