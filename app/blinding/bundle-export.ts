/**
 * The reader's side of results bundles: writes `results/<reader>-<time>.veil-results.json` into
 * the kit folder, from the reader's answer database, and records the export in its audit log.
 */
import type Database from 'better-sqlite3';
import { existsSync, mkdirSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { audit } from '../store/open.ts';
import { BUNDLE_SUFFIX, makeBundle } from './bundle.ts';
import type { KitManifest } from './kit-format.ts';
import type { KitIntegrity } from './kit-integrity.ts';

export const RESULTS_DIR = 'results';

export function writeResultsBundle(kitDir: string, db: Database.Database, manifest: KitManifest, integrity: KitIntegrity, now = new Date()): string {
  const bundle = makeBundle(db, manifest.kitId, manifest.reader, integrity.bundleKey, now);
  const dir = join(kitDir, RESULTS_DIR);
  mkdirSync(dir, { recursive: true });
  const stamp = now.toISOString().replace(/[-:]/g, '').replace('.', '-');
  let file = join(dir, `${manifest.reader}-${stamp}${BUNDLE_SUFFIX}`);
  for (let n = 2; existsSync(file); n++) file = join(dir, `${manifest.reader}-${stamp}-${n}${BUNDLE_SUFFIX}`);
  // Written beside and renamed, so a crash never leaves half a bundle under the final name.
  writeFileSync(`${file}.partial`, JSON.stringify(bundle));
  renameSync(`${file}.partial`, file);
  audit(db, 'results.exported', { file, answers: bundle.chains.answer?.rows ?? 0 });
  return file;
}
