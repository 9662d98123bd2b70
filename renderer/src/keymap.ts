/**
 * Every key of the reading room, in one table: the key handler runs it and the key map overlay
 * (`?`) shows it, so the two cannot disagree. ↑/↓ move between questions, so slices scroll with
 * ←/→ and PageUp/PageDown.
 */
import { reading } from './stores/reading.svelte.ts';
import { view } from './stores/view.svelte.ts';

export type KeyGroup = 'Scoring' | 'Items' | 'Image' | 'Window' | 'Other';

export interface KeyBinding {
  group: KeyGroup;
  /** As shown in the key map. */
  keys: string[];
  label: string;
  match(e: KeyboardEvent): boolean;
  run(e: KeyboardEvent): void;
}

const plain = (e: KeyboardEvent) => !e.ctrlKey && !e.metaKey && !e.altKey;
const key = (...names: string[]) => (e: KeyboardEvent) => plain(e) && !e.shiftKey && names.includes(e.key);
const letter = (l: string, shift = false) => (e: KeyboardEvent) => plain(e) && e.shiftKey === shift && e.key.toLowerCase() === l;
const PAN_STEP = 40;

function toggleFullScreen(): void {
  if (document.fullscreenElement) void document.exitFullscreen();
  else void document.documentElement.requestFullscreen?.().catch(() => undefined);
}

export const KEYMAP: KeyBinding[] = [
  { group: 'Scoring', keys: ['1', '…', '9', '0'], label: 'Score the focused question (0 is 10; on scales of 10 or 11 points, 1 then 0 or 1)',
    match: (e) => plain(e) && /^[0-9]$/.test(e.key), run: (e) => reading.typeDigit(Number(e.key)) },
  { group: 'Scoring', keys: ['Y', 'N'], label: 'Yes / no on a yes-no question', match: (e) => letter('y')(e) || letter('n')(e), run: (e) => reading.yesNo(e.key.toLowerCase() === 'y') },
  { group: 'Scoring', keys: ['Tab', '↓'], label: 'Next question', match: (e) => (plain(e) && e.key === 'Tab' && !e.shiftKey) || key('ArrowDown')(e), run: () => reading.moveFocus(1) },
  { group: 'Scoring', keys: ['Shift+Tab', '↑'], label: 'Previous question', match: (e) => (plain(e) && e.key === 'Tab' && e.shiftKey) || key('ArrowUp')(e), run: () => reading.moveFocus(-1) },
  { group: 'Scoring', keys: ['C'], label: 'Comment on the focused question (where the study asks for one); Esc leaves the comment',
    match: letter('c'), run: () => document.querySelector<HTMLElement>(`[data-comment-for="${reading.question()?.id}"]`)?.focus() },
  { group: 'Items', keys: ['Enter'], label: 'Save and go to the next item', match: key('Enter'), run: () => void reading.submit() },
  { group: 'Items', keys: ['Backspace'], label: 'Previous item of this session (when the study allows changing answers)', match: key('Backspace'), run: () => reading.back() },
  { group: 'Items', keys: ['!'], label: 'Flag this item (does not load, unrelated artifact, other)', match: (e) => plain(e) && e.key === '!', run: () => { reading.overlay = 'flag'; } },
  { group: 'Items', keys: ['P'], label: 'Pause / resume (the clock stops)', match: letter('p'), run: () => reading.togglePause() },
  { group: 'Image', keys: ['←', '→'], label: 'Previous / next slice (also the wheel, or drag with the left button)', match: key('ArrowLeft', 'ArrowRight'), run: (e) => view.step(e.key === 'ArrowRight' ? 1 : -1) },
  { group: 'Image', keys: ['PageUp', 'PageDown'], label: 'Previous / next slice', match: key('PageUp', 'PageDown'), run: (e) => view.step(e.key === 'PageDown' ? 1 : -1) },
  { group: 'Image', keys: ['Home', 'End'], label: 'First / last slice', match: key('Home', 'End'), run: (e) => view.goTo(e.key === 'Home' ? 0 : view.slices - 1) },
  { group: 'Image', keys: ['+', '−'], label: 'Zoom in / out (also Ctrl + wheel)', match: (e) => plain(e) && ['+', '=', '-'].includes(e.key), run: (e) => (e.key === '-' ? view.zoomOut() : view.zoomIn()) },
  { group: 'Image', keys: ['Z'], label: 'Fit the image to the window', match: letter('z'), run: () => view.fit() },
  { group: 'Image', keys: ['X'], label: 'One image pixel per screen pixel (1:1)', match: letter('x'), run: () => view.oneToOne() },
  { group: 'Image', keys: ['Shift+←→↑↓'], label: 'Pan (also Shift + drag)', match: (e) => plain(e) && e.shiftKey && e.key.startsWith('Arrow'),
    run: (e) => view.panBy(e.key === 'ArrowLeft' ? -PAN_STEP : e.key === 'ArrowRight' ? PAN_STEP : 0, e.key === 'ArrowUp' ? -PAN_STEP : e.key === 'ArrowDown' ? PAN_STEP : 0) },
  { group: 'Window', keys: ['W'], label: 'Next window preset (right or middle drag: window and level)', match: letter('w'), run: () => view.nextPreset() },
  { group: 'Window', keys: ['A'], label: 'Automatic window (1st to 99th intensity percentile)', match: letter('a'), run: () => view.autoWindow() },
  { group: 'Window', keys: ['I'], label: 'Invert', match: letter('i'), run: () => view.toggleInvert() },
  { group: 'Window', keys: ['R'], label: 'Reset window, zoom, pan and inversion', match: letter('r'), run: () => view.resetView() },
  { group: 'Other', keys: ['F'], label: 'Full screen on / off', match: letter('f'), run: () => toggleFullScreen() },
  { group: 'Other', keys: ['?'], label: 'This key map', match: (e) => plain(e) && e.key === '?', run: () => { reading.overlay = reading.overlay === 'keys' ? 'none' : 'keys'; } },
  { group: 'Other', keys: ['Esc'], label: 'Close a panel or leave a comment', match: key('Escape'), run: () => { reading.overlay = 'none'; } },
];

export const KEY_GROUPS: KeyGroup[] = ['Scoring', 'Items', 'Image', 'Window', 'Other'];
