/**
 * Opening a reading kit: the manifest, checked for shape, and its images.
 */
import { existsSync, readFileSync, readdirSync } from 'node:fs';
import { join, resolve, sep } from 'node:path';
import { readNpy } from '../images/npy.ts';
import { checkFileBytes, type KitIntegrity } from './kit-integrity.ts';
import { KIT_FORMAT, KIT_MANIFEST, KIT_VERSION, type KitImage, type KitManifest, type KitQuestionType } from './kit-format.ts';
import { KITS_DIR } from './build.ts';

export function isKitFolder(dir: string): boolean {
  return existsSync(join(dir, KIT_MANIFEST));
}

export function loadKitManifest(dir: string): KitManifest {
  const file = join(dir, KIT_MANIFEST);
  let parsed: unknown;
  try {
    parsed = JSON.parse(readFileSync(file, 'utf8'));
  } catch (e) {
    throw new Error(`${file}: not a readable kit manifest (${(e as Error).message})`);
  }
  const m = parsed as Partial<KitManifest>;
  if (m.format !== KIT_FORMAT) throw new Error(`${file}: not a Veil reading kit (format is ${JSON.stringify(m.format)})`);
  if (m.version !== KIT_VERSION) throw new Error(`${file}: kit version ${m.version} is not supported by this Veil (supports ${KIT_VERSION})`);
  if (!Array.isArray(m.items) || !Array.isArray(m.questions) || typeof m.kitId !== 'string' || typeof m.reader !== 'string') {
    throw new Error(`${file}: kit manifest is incomplete (needs kitId, reader, questions and items)`);
  }
  return withReadingDefaults(m as KitManifest, file);
}

const QUESTION_TYPES: readonly KitQuestionType[] = ['likert', 'yes-no', 'comparative'];

/** Kits written before the reading-room fields (question type, required, comment, revisits, presets) read with their defaults. */
function withReadingDefaults(m: KitManifest, file: string): KitManifest {
  const questions = m.questions.map((q) => {
    const type = q.type ?? 'likert';
    if (!QUESTION_TYPES.includes(type)) throw new Error(`${file}: question '${q.id}' has type ${JSON.stringify(type)}; expected one of: ${QUESTION_TYPES.join(', ')}`);
    return { ...q, type, required: q.required ?? true, comment: q.comment ?? false };
  });
  const presets = m.presets ?? [];
  presets.forEach((p, i) => {
    if (typeof p?.name !== 'string' || !(p.width > 0) || !Number.isFinite(p.center)) {
      throw new Error(`${file}: presets[${i}] must have a name, a center and a width above 0`);
    }
  });
  return { ...m, revisits: m.revisits ?? false, presets, questions };
}

/** Kit folders of a study folder (`<dir>/kits/<reader>/`), by reader code. */
export function findKits(studyDir: string): Map<string, string> {
  const kitsDir = join(studyDir, KITS_DIR);
  const out = new Map<string, string>();
  if (!existsSync(kitsDir)) return out;
  for (const d of readdirSync(kitsDir, { withFileTypes: true })) {
    if (d.isDirectory() && isKitFolder(join(kitsDir, d.name))) out.set(d.name, join(kitsDir, d.name));
  }
  return out;
}

/** The display pixels of one view of an item as little-endian uint16, slice-major. */
export function readViewPixels(kitDir: string, view: KitImage, integrity?: KitIntegrity): Uint16Array {
  const root = resolve(kitDir);
  const file = resolve(root, view.image);
  if (!file.startsWith(root + sep)) throw new Error(`kit image ${view.image}: path leaves the kit folder`);
  const bytes = readFileSync(file);
  if (integrity) checkFileBytes(integrity, kitDir, view.image, bytes);
  const v = readNpy(bytes, file);
  if (v.columns !== view.columns || v.rows !== view.rows || v.slices !== view.slices) {
    throw new Error(`${file}: image is ${v.slices}x${v.rows}x${v.columns}, the kit manifest says ${view.slices}x${view.rows}x${view.columns}`);
  }
  const out = new Uint16Array(v.pixels.length);
  for (let i = 0; i < out.length; i++) out[i] = v.pixels[i];
  return out;
}
