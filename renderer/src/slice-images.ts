/**
 * Feeds cornerstone-core from the API: each slice of an item becomes an image with the id
 * `veil:<item>:<slice>`, its pixels a view into the item's uint16 buffer (no copy).
 */
import cornerstone, { type CornerstoneImage } from 'cornerstone-core';
import type { KitImageView } from '../../app/api-contract.ts';

/** Volumes by key (`<item>~<view>`). */
const volumes = new Map<string, { item: KitImageView; pixels: Uint16Array; min: number; max: number }>();

export function registerVolume(key: string, item: KitImageView, buffer: ArrayBuffer): void {
  const pixels = new Uint16Array(buffer);
  let min = 65535;
  let max = 0;
  for (let i = 0; i < pixels.length; i++) { const v = pixels[i]; if (v < min) min = v; if (v > max) max = v; }
  volumes.set(key, { item, pixels, min, max });
  // Keep only a few volumes in memory.
  while (volumes.size > 3) volumes.delete(volumes.keys().next().value!);
}

export function sliceImageId(key: string, slice: number): string {
  return `veil:${key}:${slice}`;
}

function loadSlice(imageId: string): { promise: Promise<CornerstoneImage> } {
  const [, key, sliceText] = imageId.split(':');
  const v = volumes.get(key);
  if (!v) return { promise: Promise.reject(new Error(`image ${imageId} is not loaded`)) };
  const { item } = v;
  const slice = Number(sliceText);
  const size = item.rows * item.columns;
  const data = v.pixels.subarray(slice * size, (slice + 1) * size);
  const image: CornerstoneImage = {
    imageId, minPixelValue: v.min, maxPixelValue: Math.max(v.max, v.min + 1), slope: 1, intercept: 0,
    windowCenter: item.window.center, windowWidth: item.window.width,
    getPixelData: () => data, rows: item.rows, columns: item.columns, height: item.rows, width: item.columns,
    color: false, columnPixelSpacing: item.spacing[0], rowPixelSpacing: item.spacing[1], invert: false,
    sizeInBytes: data.byteLength,
  };
  return { promise: Promise.resolve(image) };
}

cornerstone.registerImageLoader('veil', loadSlice);
