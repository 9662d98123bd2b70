/**
 * What a reading kit holds. A kit is a folder `kits/<reader>/` with `kit.json` (this manifest)
 * and `images/<item id>.npy` (display-ready uint16 pixels). It carries no identity, no method
 * ids or labels, no source paths: only what the reading room needs to show and score items.
 */
export const KIT_FORMAT = 'veil-kit';
export const KIT_VERSION = 1;
export const KIT_MANIFEST = 'kit.json';

export interface KitQuestion {
  id: string;
  text: string;
  points: number;
  low: string;
  high: string;
  labels: Record<string, string>;
}

/** One image volume of an item. */
export interface KitImage {
  /** Relative to the kit folder. */
  image: string;
  columns: number;
  rows: number;
  slices: number;
  spacing: [number, number, number];
  window: { center: number; width: number };
}

export interface KitItem {
  id: string;
  session: number;
  /** One view for single presentation; two (left, right) for side-by-side. */
  views: KitImage[];
}

export interface KitManifest {
  format: typeof KIT_FORMAT;
  version: typeof KIT_VERSION;
  kitId: string;
  reader: string;
  title: string;
  createdAt: string;
  sessions: number;
  washoutDays: number;
  presentation: 'single' | 'side-by-side';
  questions: KitQuestion[];
  items: KitItem[];
}
