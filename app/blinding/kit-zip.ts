/**
 * A reading kit as one .zip file for transfer (`veil build --zip`): every file of the kit folder
 * under a top folder named like it, so that unpacking the archive anywhere gives the kit folder
 * back, which the reading room then checks against its signed integrity.json as usual. Entries
 * are deflated (fflate, level 1: image data gains little from harder work) and carry the ZIP
 * format's earliest date, 1980-01-01, instead of the build's, so the archive holds no date at all.
 * Written file by file to disk, so memory holds one image at a time.
 *
 * The writer makes plain ZIP, without the ZIP64 extension, whose sizes and offsets are 32-bit: a
 * kit whose files add up to more than ZIP_MAX_BYTES is not zipped (`zipLimitProblem` says why)
 * rather than written as a broken archive.
 */
import { createWriteStream, statSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { basename, join } from 'node:path';
import { Zip, ZipDeflate } from 'fflate';
import { INTEGRITY_FILE, listFiles } from './kit-integrity.ts';

const ZIP_EPOCH = new Date(1980, 0, 1);

/**
 * The most bytes of kit files one archive takes: 4 GiB (32-bit sizes and offsets) less 64 MiB for
 * headers and deflate's worst case on incompressible data (5 bytes per 64 KiB stored block).
 */
export const ZIP_MAX_BYTES = 2 ** 32 - 64 * 2 ** 20;

const filesOf = (kitDir: string): string[] => [INTEGRITY_FILE, ...listFiles(kitDir)];

/** Why a kit folder is too large for one archive, or null. */
export function zipLimitProblem(kitDir: string, maxBytes = ZIP_MAX_BYTES): string | null {
  const total = filesOf(kitDir).reduce((n, f) => n + statSync(join(kitDir, f)).size, 0);
  if (total <= maxBytes) return null;
  const gb = (b: number) => `${(b / 1e9).toFixed(2)} GB`;
  return `kit ${basename(kitDir)} holds ${gb(total)}, more than one ZIP archive without ZIP64 takes (${gb(maxBytes)}); send its folder instead`;
}

/** Writes the kit folder `kitDir` as `zipPath`; returns the archive's size in bytes. */
export async function zipKit(kitDir: string, zipPath: string): Promise<number> {
  const top = basename(kitDir);
  const out = createWriteStream(zipPath);
  let failure: Error | null = null;
  out.on('error', (e) => (failure ??= e)); // a write error (a full disk, say); the stream then closes
  const closed = new Promise<void>((done) => out.on('close', done));
  const drained = () => new Promise<void>((done) => {
    const go = () => {
      out.off('drain', go);
      out.off('close', go);
      done();
    };
    out.on('drain', go);
    out.on('close', go);
  });
  let size = 0;
  const zip = new Zip((err, chunk, final) => {
    if (err) failure ??= err;
    else {
      size += chunk.length;
      out.write(chunk);
    }
    if (final || err) out.end();
  });
  for (const file of filesOf(kitDir)) {
    if (failure) break;
    const entry = new ZipDeflate(`${top}/${file}`, { level: 1 });
    entry.mtime = ZIP_EPOCH;
    zip.add(entry);
    entry.push(await readFile(join(kitDir, file)), true);
    if (out.writableNeedDrain) await drained();
  }
  if (!failure) zip.end();
  else out.destroy();
  await closed;
  if (failure) throw failure;
  return size;
}
