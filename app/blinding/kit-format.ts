/**
 * What a reading kit holds. A kit is a folder `kits/<reader>/` with `kit.json` (this manifest)
 * and `images/<item id>.npy` (display-ready uint16 pixels). It carries no identity, no method
 * ids or labels, no source paths: only what the reading room needs to show and score items.
 */
export const KIT_FORMAT = 'veil-kit';
export const KIT_VERSION = 1;
export const KIT_MANIFEST = 'kit.json';
/** The reader's answer database, kept in the kit folder beside the kit's own files (app/store/reader-answers.ts). */
export const ANSWERS_FILE = 'answers.sqlite';

/**
 * likert: a scale from `low` (1) to `high` (`points`); yes-no: points 2, scored 1 = no, 2 = yes;
 * comparative (side-by-side items): an odd number of points, `low` names the left end ("left much
 * better"), `high` the right end, the middle point is no difference.
 */
export type KitQuestionType = 'likert' | 'yes-no' | 'comparative';

export interface KitQuestion {
  id: string;
  text: string;
  points: number;
  low: string;
  high: string;
  labels: Record<string, string>;
  /** Kits written before these three fields read as likert, required, no comment. */
  type: KitQuestionType;
  /** Submission is refused while a required question has no score. */
  required: boolean;
  /** The reader may add a free-text comment to this question. */
  comment: boolean;
}

/**
 * A named window in the kit's display units (the uint16 values of its images, 0..4000 after the
 * build's display scaling; see ./display-scale.ts). The reading room offers them beside its own
 * default, automatic and reset windows.
 */
export interface KitWindowPreset {
  name: string;
  center: number;
  width: number;
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
  /** A calibration item: the intended scores and what to see, shown to the reader. Absent: a study item. */
  calibration?: { scores: Record<string, number>; note: string };
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
  /** The reader may go back (and change answers) within the session not yet complete. Absent: false. */
  revisits: boolean;
  /** Window presets offered in the reading room. Absent: none. */
  presets: KitWindowPreset[];
  questions: KitQuestion[];
  items: KitItem[];
}
