/**
 * State of the reading room: the open kit, the item on screen, the draft answers, the session
 * screens, and the one rule that matters most: the screen moves on only after the host confirms
 * that the answer is stored.
 */
import type { ItemFlag, KitItemView, KitQuestionView, KitView, Progress, SessionState } from '../../../app/api-contract.ts';
import { api } from '../api-client.ts';
import { ActiveTimer } from './active-time.ts';
import { view } from './view.svelte.ts';
import { hasVolume, registerVolume, volumeKey } from '../slice-images.ts';

export type Phase = 'loading' | 'display-check' | 'reading' | 'saving' | 'session-end' | 'locked' | 'done' | 'error';
export type ImageState = 'loading' | 'ready' | 'failed';

/** On a scale of 10 or more points, a `1` waits this long for a second digit (10, 11). */
const SECOND_DIGIT_MS = 800;

export const FLAG_REASONS: { reason: ItemFlag['reason']; label: string }[] = [
  { reason: 'does-not-load', label: 'The image does not load or is unreadable' },
  { reason: 'unrelated-artifact', label: 'An artifact unrelated to the reconstruction (e.g. motion)' },
  { reason: 'other', label: 'Other (say why)' },
];

class ReadingStore {
  kit = $state<KitView | null>(null);
  index = $state(0);
  draft = $state<Record<string, number>>({});
  comments = $state<Record<string, string>>({});
  flag = $state<ItemFlag | null>(null);
  focused = $state(0);
  phase = $state<Phase>('loading');
  /** A problem that is not about one question (e.g. not saved). */
  message = $state<string | null>(null);
  /** The required question that blocked saving, with its message. */
  missing = $state<{ id: string; text: string } | null>(null);
  progress = $state<Progress>({ answered: 0, total: 0, next: null });
  sessions = $state<SessionState[]>([]);
  /** The session whose end screen is showing. */
  endedSession = $state<number | null>(null);
  imageState = $state<ImageState>('loading');
  imageError = $state<string | null>(null);
  paused = $state(false);
  overlay = $state<'none' | 'keys' | 'flag'>('none');
  exported = $state<string | null>(null);
  exportError = $state<string | null>(null);
  private readonly pixels = new Map<string, Promise<ArrayBuffer>>();
  private readonly timer = new ActiveTimer();
  private showToken = 0;
  private pendingOne: { question: number; at: number } | null = null;

  get item(): KitItemView | null {
    return this.kit && (this.phase === 'reading' || this.phase === 'saving') ? this.kit.items[this.index] ?? null : null;
  }

  get session(): SessionState | null {
    const it = this.kit?.items[this.index];
    return it ? this.sessions[it.session - 1] ?? null : null;
  }

  /** Whether Backspace may go to the previous item now. */
  get canGoBack(): boolean {
    const kit = this.kit;
    if (!kit || !kit.revisits || this.phase !== 'reading' || this.index === 0) return false;
    const prev = kit.items[this.index - 1];
    const s = this.sessions[prev.session - 1];
    return prev.session === kit.items[this.index].session && !!s && !s.completedAt;
  }

  async open(reader: string): Promise<void> {
    this.phase = 'loading';
    this.message = null;
    try {
      const kit = await api.openKit({ reader });
      this.kit = kit;
      this.progress = kit.progress;
      this.sessions = kit.sessionStates;
      if (kit.displayCheck === null && kit.progress.next !== null && !kit.sessionStates[0]?.completedAt) this.phase = 'display-check';
      else this.resume();
    } catch (e) {
      this.phase = 'error';
      this.message = (e as Error).message;
    }
  }

  async confirmDisplayCheck(seen: boolean): Promise<void> {
    const kit = this.kit;
    if (!kit) return;
    try {
      const { at } = await api.confirmDisplayCheck({ reader: kit.reader, seen });
      kit.displayCheck = { seen, at };
      this.resume();
    } catch (e) {
      this.message = `Not saved: ${(e as Error).message}`;
    }
  }

  /** Goes to the first item without a saved answer, or to the screen that says why not. */
  private resume(): void {
    const kit = this.kit!;
    const next = this.progress.next;
    if (next === null) {
      this.phase = 'done';
      return;
    }
    const s = this.sessions[kit.items[next].session - 1];
    if (s && !s.open) {
      this.index = next;
      this.phase = 'locked';
      return;
    }
    void this.show(next);
  }

  pixelsOf(itemId: string, viewIndex = 0): Promise<ArrayBuffer> {
    const key = volumeKey(itemId, viewIndex);
    let p = this.pixels.get(key);
    if (!p) {
      p = api.itemPixels({ reader: this.kit!.reader, itemId, view: viewIndex });
      p.catch(() => this.pixels.delete(key));
      this.pixels.set(key, p);
    }
    return p;
  }

  /** Fetches and registers every view of an item; resolves to their volume keys. */
  private async prepare(item: KitItemView): Promise<string[]> {
    return Promise.all(item.views.map(async (v, i) => {
      const key = volumeKey(item.id, i);
      if (!hasVolume(key)) registerVolume(key, v, await this.pixelsOf(item.id, i));
      return key;
    }));
  }

  private async show(index: number): Promise<void> {
    const kit = this.kit!;
    const item = kit.items[index];
    const token = ++this.showToken;
    this.index = index;
    this.draft = { ...(kit.answers[item.id] ?? {}) };
    this.comments = { ...(kit.comments[item.id] ?? {}) };
    this.flag = kit.flags[item.id] ? { ...kit.flags[item.id] } : null;
    this.focused = 0;
    this.missing = null;
    this.message = null;
    this.pendingOne = null;
    this.phase = 'reading';
    this.timer.start();
    this.imageError = null;
    let keys: string[];
    if (item.views.every((_, i) => hasVolume(volumeKey(item.id, i)))) {
      keys = item.views.map((_, i) => volumeKey(item.id, i));
    } else {
      this.imageState = 'loading';
      try {
        keys = await this.prepare(item);
      } catch (e) {
        if (token === this.showToken) { this.imageState = 'failed'; this.imageError = (e as Error).message; }
        return;
      }
      if (token !== this.showToken) return;
    }
    view.reset(item.views, keys, kit.presets);
    view.draw();
    this.imageState = 'ready';
    // Fetch the neighbours once this item is on screen, so that they never delay its first frame.
    requestAnimationFrame(() => setTimeout(() => { if (token === this.showToken) this.prefetchAround(index); }, 0));
  }

  /** The next item (so it is on screen at once after saving) and the previous one (for going back). */
  private prefetchAround(index: number): void {
    const kit = this.kit!;
    const wanted = [kit.items[index], kit.items[index + 1], kit.revisits ? kit.items[index - 1] : undefined].filter((i): i is KitItemView => !!i);
    for (const it of wanted.slice(1)) void this.prepare(it).catch(() => undefined);
    const keep = new Set(wanted.flatMap((it) => it.views.map((_, v) => volumeKey(it.id, v))));
    for (const key of this.pixels.keys()) if (!keep.has(key)) this.pixels.delete(key);
  }

  question(i = this.focused): KitQuestionView | undefined {
    return this.kit?.questions[i];
  }

  score(questionIndex: number, value: number, advance = true): void {
    const q = this.question(questionIndex);
    if (!q || this.phase !== 'reading' || !Number.isInteger(value) || value < 1 || value > q.points) return;
    this.draft = { ...this.draft, [q.id]: value };
    if (this.missing?.id === q.id) this.missing = null;
    this.message = null;
    if (advance && questionIndex < this.kit!.questions.length - 1) this.focused = questionIndex + 1;
  }

  /** A digit key: the score of the focused question (0 = 10; on 10+ point scales, 1 then 0/1 = 10/11). */
  typeDigit(d: number): void {
    const now = performance.now();
    const pending = this.pendingOne;
    this.pendingOne = null;
    if (pending && now - pending.at < SECOND_DIGIT_MS && (d === 0 || d === 1)) {
      this.score(pending.question, 10 + d);
      return;
    }
    const q = this.question();
    if (!q) return;
    const value = d === 0 ? 10 : d;
    if (d === 1 && q.points >= 10) {
      this.score(this.focused, 1, false);
      this.pendingOne = { question: this.focused, at: now };
      return;
    }
    this.score(this.focused, value);
  }

  /** Y / N on a yes-no question (scored 1 = no, 2 = yes). */
  yesNo(yes: boolean): void {
    if (this.question()?.type === 'yes-no') this.score(this.focused, yes ? 2 : 1);
  }

  moveFocus(delta: number): void {
    if (!this.kit) return;
    const n = this.kit.questions.length;
    this.pendingOne = null;
    this.focused = (this.focused + delta + n) % n;
  }

  setComment(questionId: string, text: string): void {
    this.comments = { ...this.comments, [questionId]: text };
  }

  setFlag(flag: ItemFlag | null): void {
    this.flag = flag;
    this.overlay = 'none';
    if (flag?.reason === 'does-not-load') this.missing = null;
  }

  async submit(): Promise<void> {
    const kit = this.kit;
    const item = this.item;
    if (!kit || !item || this.phase !== 'reading') return;
    const unloadable = this.flag?.reason === 'does-not-load';
    const missing = kit.questions.filter((q) => q.required && this.draft[q.id] == null);
    if (missing.length && !unloadable) {
      const first = missing[0];
      this.focused = kit.questions.indexOf(first);
      const others = missing.length - 1;
      this.missing = {
        id: first.id,
        text: `Answer this question before moving on${others ? ` (${others} more question${others === 1 ? ' still needs' : 's still need'} an answer)` : ''}.`,
      };
      return;
    }
    this.phase = 'saving';
    const scores = { ...this.draft };
    const comments = Object.fromEntries(kit.questions.filter((q) => q.comment).map((q) => [q.id, (this.comments[q.id] ?? '').trim()]));
    const hadComments = kit.comments[item.id] ?? {};
    for (const [id, text] of Object.entries(comments)) if (!text && !hadComments[id]) delete comments[id];
    try {
      const r = await api.submitAnswer({ reader: kit.reader, itemId: item.id, scores, comments, flag: this.flag, seconds: this.timer.seconds() });
      // Acknowledged: the answer is on disk. Only now does the screen move on.
      kit.answers[item.id] = { ...(kit.answers[item.id] ?? {}), ...scores };
      kit.comments[item.id] = Object.fromEntries(Object.entries(comments).filter(([, t]) => t));
      if (this.flag) kit.flags[item.id] = this.flag;
      else delete kit.flags[item.id];
      if (!kit.submitted.includes(item.id)) kit.submitted.push(item.id);
      this.progress = r.progress;
      const ended = r.sessionStates[item.session - 1]?.completedAt && !this.sessions[item.session - 1]?.completedAt;
      this.sessions = r.sessionStates;
      if (ended) {
        this.timer.stop();
        this.endedSession = item.session;
        this.phase = r.progress.next === null ? 'done' : 'session-end';
        return;
      }
      const following = kit.items[this.index + 1];
      if (following && following.session === item.session) void this.show(this.index + 1);
      else this.resume();
    } catch (e) {
      this.phase = 'reading';
      this.message = `Not saved: ${(e as Error).message}. Your answers are still here; press Enter to try again.`;
    }
  }

  /** Backspace: the previous item of this session, with its saved answers, when the kit allows it. */
  back(): void {
    if (this.canGoBack) void this.show(this.index - 1);
  }

  /** From the end-of-session screen: on to the next session, or to its lock screen. */
  continueReading(): void {
    this.endedSession = null;
    this.resume();
  }

  togglePause(): void {
    if (this.phase !== 'reading' && !this.paused) return;
    this.paused = !this.paused;
    this.timer.pause(this.paused);
  }

  async exportResults(): Promise<void> {
    const kit = this.kit;
    if (!kit) return;
    this.exportError = null;
    try {
      this.exported = (await api.exportResults({ reader: kit.reader })).file;
    } catch (e) {
      this.exportError = (e as Error).message;
    }
  }
}

export const reading = new ReadingStore();
