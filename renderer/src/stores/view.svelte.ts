/**
 * How the item on screen is looked at: slice, zoom, pan, window/level, inversion. One state for
 * every pane, so the two views of a side-by-side item scroll, zoom, pan and window together.
 * Commands draw at once on every pane (no effect scheduling in between), so a slice change is on
 * screen in the next frame.
 */
import type { KitImageView, WindowPreset } from '../../../app/api-contract.ts';
import { percentileWindow } from '../viewer/percentile-window.ts';
import type { Look, Pane } from '../viewer/pane.ts';
import { volumePixels } from '../slice-images.ts';

const ZOOM_STEP = 1.25;
const MIN_SCALE = 0.05;
const MAX_SCALE = 40;

class ViewStore {
  slice = $state(0);
  slices = $state(1);
  scale = $state<number | null>(null);
  pan = $state({ x: 0, y: 0 });
  voi = $state({ center: 0, width: 1 });
  invert = $state(false);
  /** Name of the window in use: Default, a preset's name, Automatic, or Manual after a drag. */
  windowName = $state('Default');
  private presetIndex = -1;
  private presets: WindowPreset[] = [];
  private defaultWindow = { center: 0, width: 1 };
  private keys: string[] = [];
  private readonly panes = new Map<number, Pane>();

  look(): Look {
    return { slice: this.slice, scale: this.scale, pan: { ...this.pan }, voi: { ...this.voi }, invert: this.invert };
  }

  attach(view: number, pane: Pane): void {
    this.panes.set(view, pane);
  }

  detach(view: number, pane: Pane): void {
    if (this.panes.get(view) === pane) this.panes.delete(view);
  }

  /** A new item: middle slice, fit, default window. `keys` are its registered volumes, by view. */
  reset(views: KitImageView[], keys: string[], presets: WindowPreset[]): void {
    this.keys = keys;
    this.presets = presets;
    this.slices = Math.min(...views.map((v) => v.slices));
    this.slice = Math.floor(this.slices / 2);
    this.defaultWindow = { ...views[0].window };
    this.resetLook();
  }

  private resetLook(): void {
    this.scale = null;
    this.pan = { x: 0, y: 0 };
    this.voi = { ...this.defaultWindow };
    this.invert = false;
    this.windowName = 'Default';
    this.presetIndex = -1;
  }

  /** Draws the current look on one pane (a pane that just appeared) or on all. */
  draw(view?: number): void {
    const look = this.look();
    for (const [v, pane] of this.panes) {
      if (view !== undefined && v !== view) continue;
      const key = this.keys[v];
      if (key) pane.show(key, look);
    }
  }

  private restyle(): void {
    const look = this.look();
    for (const pane of this.panes.values()) pane.apply(look);
  }

  step(delta: number): void {
    this.goTo(this.slice + delta);
  }

  goTo(slice: number): void {
    const next = Math.min(this.slices - 1, Math.max(0, slice));
    if (next === this.slice) return;
    this.slice = next;
    this.draw();
  }

  zoom(factor: number): void {
    const from = this.scale ?? this.panes.get(0)?.fitScale() ?? 1;
    this.scale = Math.min(MAX_SCALE, Math.max(MIN_SCALE, from * factor));
    this.restyle();
  }

  zoomIn(): void { this.zoom(ZOOM_STEP); }
  zoomOut(): void { this.zoom(1 / ZOOM_STEP); }

  fit(): void {
    this.scale = null;
    this.pan = { x: 0, y: 0 };
    this.restyle();
  }

  oneToOne(): void {
    this.scale = 1;
    this.restyle();
  }

  /** Pan by screen pixels. */
  panBy(dx: number, dy: number): void {
    const s = this.scale ?? this.panes.get(0)?.fitScale() ?? 1;
    this.pan = { x: this.pan.x + dx / s, y: this.pan.y + dy / s };
    this.restyle();
  }

  /** Window/level from a drag: right = wider, down = brighter level (higher center). */
  adjustWindow(dx: number, dy: number): void {
    const gain = Math.max(1, this.defaultWindow.width / 400);
    this.voi = { width: Math.max(1, this.voi.width + dx * gain), center: this.voi.center + dy * gain };
    this.windowName = 'Manual';
    this.restyle();
  }

  /** Cycles Default → each preset of the kit → Default. */
  nextPreset(): void {
    if (this.presets.length === 0) {
      this.useWindow(this.defaultWindow, 'Default');
      return;
    }
    this.presetIndex = this.presetIndex + 1 >= this.presets.length ? -1 : this.presetIndex + 1;
    const p = this.presets[this.presetIndex];
    if (p) this.useWindow(p, p.name);
    else this.useWindow(this.defaultWindow, 'Default');
  }

  autoWindow(): void {
    const volumes = this.keys.map((k) => volumePixels(k)).filter((p): p is Uint16Array => !!p);
    if (volumes.length) this.useWindow(percentileWindow(volumes), 'Automatic');
  }

  private useWindow(w: { center: number; width: number }, name: string): void {
    this.voi = { center: w.center, width: w.width };
    this.windowName = name;
    this.restyle();
  }

  toggleInvert(): void {
    this.invert = !this.invert;
    this.restyle();
  }

  resetView(): void {
    this.resetLook();
    this.restyle();
  }

  resize(): void {
    for (const pane of this.panes.values()) pane.resize();
    this.restyle();
  }
}

export const view = new ViewStore();
