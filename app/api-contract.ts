/**
 * The operations every host exposes (Electron IPC, localhost HTTP), as plain JSON-safe values.
 * This file holds only names and types, so the preload script and the renderer can import it
 * without pulling in Node modules. The implementation is in ./api.ts.
 */
export interface AppInfo {
  product: 'Veil';
  version: string;
  notice: string;
  /** 'study': a study folder with one kit per reader; 'kit': one reader's kit. */
  mode: 'study' | 'kit';
  title: string;
}

export interface Progress {
  answered: number;
  total: number;
  /** Index (0-based, in reading order) of the first item without a complete answer; null when done. */
  next: number | null;
}

export interface ReaderEntry {
  reader: string;
  items: number;
  answered: number;
}

export interface KitQuestionView {
  id: string;
  text: string;
  points: number;
  low: string;
  high: string;
  labels: Record<string, string>;
}

/** Geometry and default window of one image of an item. */
export interface KitImageView {
  columns: number;
  rows: number;
  slices: number;
  spacing: [number, number, number];
  window: { center: number; width: number };
}

export interface KitItemView {
  id: string;
  session: number;
  /** One view for single presentation; two (left, right) for side-by-side. */
  views: KitImageView[];
}

export interface KitView {
  kitId: string;
  reader: string;
  title: string;
  sessions: number;
  questions: KitQuestionView[];
  items: KitItemView[];
  /** Latest score per item and question. */
  answers: Record<string, Record<string, number>>;
  progress: Progress;
}

export interface SubmitRequest {
  reader: string;
  itemId: string;
  scores: Record<string, number>;
  /** Active seconds spent on the item. */
  seconds: number | null;
}

export interface VeilApi {
  info(): Promise<AppInfo>;
  listReaders(): Promise<ReaderEntry[]>;
  openKit(req: { reader: string }): Promise<KitView>;
  /** Display pixels of one view of an item (default 0): little-endian uint16, slice-major (slice, row, column). */
  itemPixels(req: { reader: string; itemId: string; view?: number }): Promise<ArrayBuffer>;
  /** Resolves only once the answer is durable on disk. */
  submitAnswer(req: SubmitRequest): Promise<{ progress: Progress }>;
  /** Writes a results bundle of every answer so far into the kit's results/ folder and returns its path. */
  exportResults(req: { reader: string }): Promise<{ file: string }>;
}

export type OperationName = keyof VeilApi;

export const OPERATIONS: readonly OperationName[] = ['info', 'listReaders', 'openKit', 'itemPixels', 'submitAnswer', 'exportResults'] as const;

/** An error meant for the user: bad input or a refused action, with a message naming what and where. */
export class ApiError extends Error {
  constructor(message: string, public readonly status = 400) {
    super(message);
    this.name = 'ApiError';
  }
}
