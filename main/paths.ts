/** Where the built parts live, relative to the repository (or the packaged app). */
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export const REPO_ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');
export const RENDERER_DIST = join(REPO_ROOT, 'dist', 'renderer');
export const ELECTRON_DIST = join(REPO_ROOT, 'dist', 'electron');
/** Where `npm start` keeps the demo study unless VEIL_DATA says otherwise. */
export const DEFAULT_DATA = process.env.VEIL_DATA ? resolve(process.env.VEIL_DATA) : join(REPO_ROOT, '.veil');
