/**
 * One cornerstone-core viewport showing one view of an item. The view store (../stores/
 * view.svelte.ts) drives every pane with the same slice, zoom, pan, window and inversion, which
 * is how the two panes of a side-by-side item stay linked.
 */
import cornerstone, { type Viewport } from 'cornerstone-core';
import { sliceImage } from '../slice-images.ts';

export interface Look {
  slice: number;
  /** Image pixels per screen pixel; null: fit to the pane. */
  scale: number | null;
  /** Pan, in image pixels. */
  pan: { x: number; y: number };
  voi: { center: number; width: number };
  invert: boolean;
}

export class Pane {
  private key: string | null = null;
  private shownSlice = -1;

  constructor(readonly element: HTMLDivElement) {
    cornerstone.enable(element);
  }

  /** Shows `key` (a registered volume) with `look`; cheap when only the slice or the look changed. */
  show(key: string, look: Look): void {
    const vp = cornerstone.getViewport(this.element);
    const fresh = key !== this.key || !vp;
    if (fresh || look.slice !== this.shownSlice) {
      cornerstone.displayImage(this.element, sliceImage(key, look.slice), fresh ? undefined : vp);
      this.key = key;
      this.shownSlice = look.slice;
    }
    this.apply(look);
  }

  apply(look: Look): void {
    const vp = cornerstone.getViewport(this.element);
    if (!vp) return;
    if (look.scale === null) {
      cornerstone.fitToWindow(this.element);
      Object.assign(vp, cornerstone.getViewport(this.element));
    } else {
      vp.scale = look.scale;
    }
    vp.translation = { x: look.pan.x, y: look.pan.y };
    vp.voi = { windowCenter: look.voi.center, windowWidth: look.voi.width };
    vp.invert = look.invert;
    cornerstone.setViewport(this.element, vp as Viewport);
  }

  /** The scale that fit-to-pane gives now (for zooming from fit). */
  fitScale(): number {
    return cornerstone.getViewport(this.element)?.scale ?? 1;
  }

  resize(): void {
    if (this.key) cornerstone.resize(this.element, false);
  }

  destroy(): void {
    cornerstone.disable(this.element);
  }
}
