/**
 * Feeds cornerstone-core from the API: each slice of an item's view becomes an image with the
 * id `veil:<item>~<view>:<slice>`, its pixels a view into the volume's uint16 buffer (no copy).
 * Slices are made synchronously (`sliceImage`) so that a slice change is drawn in the very next
 * frame; the same images are offered through cornerstone's loader interface as well.
 */
import cornerstone, { type CornerstoneImage } from 'cornerstone-core';
import type { KitImageView } from '../../app/api-contract.ts';

interface Volume { view: KitImageView; pixels: Uint16Array; min: number; max: number; slices: Map<number, CornerstoneImage> }

/** Volumes by key (`<item>~<view>`): the item on screen, the next one and the previous one. */
const volumes = new Map<string, Volume>();
const KEEP = 6;

export function volumeKey(itemId: string, view: number): string {
  return `${itemId}~${view}`;
}

export function hasVolume(key: string): boolean {
  return volumes.has(key);
}

export function volumePixels(key: string): Uint16Array | null {
  return volumes.get(key)?.pixels ?? null;
}

export function registerVolume(key: string, view: KitImageView, buffer: ArrayBuffer): void {
  if (volumes.has(key)) return;
  const pixels = new Uint16Array(buffer);
  let min = 65535;
  let max = 0;
  for (let i = 0; i < pixels.length; i++) { const v = pixels[i]; if (v < min) min = v; if (v > max) max = v; }
  volumes.set(key, { view, pixels, min, max, slices: new Map() });
  while (volumes.size > KEEP) volumes.delete(volumes.keys().next().value!);
}

export function sliceImageId(key: string, slice: number): string {
  return `veil:${key}:${slice}`;
}

export function sliceImage(key: string, slice: number): CornerstoneImage {
  const v = volumes.get(key);
  if (!v) throw new Error(`image ${key} is not loaded`);
  let image = v.slices.get(slice);
  if (image) return image;
  const { view } = v;
  const size = view.rows * view.columns;
  const data = v.pixels.subarray(slice * size, (slice + 1) * size);
  image = {
    imageId: sliceImageId(key, slice), minPixelValue: v.min, maxPixelValue: Math.max(v.max, v.min + 1), slope: 1, intercept: 0,
    windowCenter: view.window.center, windowWidth: view.window.width,
    getPixelData: () => data, rows: view.rows, columns: view.columns, height: view.rows, width: view.columns,
    color: false, columnPixelSpacing: view.spacing[0], rowPixelSpacing: view.spacing[1], invert: false,
    sizeInBytes: data.byteLength,
  };
  v.slices.set(slice, image);
  return image;
}

function loadSlice(imageId: string): { promise: Promise<CornerstoneImage> } {
  const [, key, slice] = imageId.split(':');
  try {
    return { promise: Promise.resolve(sliceImage(key, Number(slice))) };
  } catch (e) {
    return { promise: Promise.reject(e) };
  }
}

cornerstone.registerImageLoader('veil', loadSlice);
