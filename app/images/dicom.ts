/**
 * DICOM sources: a single Part 10 file (single- or multi-frame) or a folder holding one series.
 *
 * A folder is read file by file (sub-folders included, hidden files skipped); files without the
 * Part 10 marker and DICOM objects without pixel data (DICOMDIR, reports) are skipped and named
 * in the volume's notes; a file that is DICOM but broken stops the read, naming that file.
 * Several series in one folder are refused, each series named (see ./dicom-series.ts).
 * The provenance hash is SHA-256 over the bytes of the files that make the volume, in slice order.
 */
import { createHash } from 'node:crypto';
import { closeSync, fstatSync, openSync, readSync } from 'node:fs';
import { readdir } from 'node:fs/promises';
import { basename, join, relative, resolve, sep } from 'node:path';
import { isPart10, parseDicomFile } from './dicom-file.ts';
import type { DicomFrame } from './dicom-file.ts';
import { assembleSeries, fillSlice, planSeries, severalSeries, splitSeries, summarize } from './dicom-series.ts';
import type { SeriesSummary } from './dicom-series.ts';
import { SourceError } from './source-error.ts';
import type { Volume } from './volume.ts';

/** Reads one Part 10 file's bytes; `path` names it in messages and provenance. */
export function readDicomBytes(bytes: Uint8Array, path: string): Volume {
  const content = parseDicomFile(bytes, path, basename(path));
  if (content.kind === 'no-image') throw new SourceError(path, `holds no image: it is ${content.why}`);
  const groups = splitSeries(content.frames);
  if (groups.size > 1) throw severalSeries(path, summarize(groups));
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  return assembleSeries(content.frames, path, { path, format: 'dicom', sha256 });
}

async function listFiles(folder: string): Promise<string[]> {
  const out: string[] = [];
  const walk = async (dir: string): Promise<void> => {
    const entries = await readdir(dir, { withFileTypes: true });
    for (const e of entries) {
      if (e.name.startsWith('.')) continue;
      const p = join(dir, e.name);
      if (e.isDirectory()) await walk(p);
      else if (e.isFile()) out.push(p);
    }
  };
  await walk(folder);
  return out.sort();
}

const YIELD_BYTES = 16 * 2 ** 20;

/**
 * Reads files one after the other into one buffer that is reused, so that reading a series
 * allocates (and the system maps) memory for one file, not for all of them. Reads are synchronous
 * (a promise round trip per file cost more than the read itself on a folder of small slices); the
 * reader yields to the event loop after every YIELD_BYTES so that a host serving the app stays
 * responsive during a long read.
 */
class FileReader {
  private buffer = Buffer.alloc(0);
  private sinceYield = 0;

  async read(path: string): Promise<Uint8Array> {
    if (this.sinceYield >= YIELD_BYTES) {
      this.sinceYield = 0;
      await new Promise((done) => setImmediate(done));
    }
    let fd: number | undefined;
    try {
      fd = openSync(path, 'r');
      const { size } = fstatSync(fd);
      if (this.buffer.length < size) this.buffer = Buffer.allocUnsafe(Math.max(size, 2 * this.buffer.length));
      let done = 0;
      while (done < size) {
        const bytesRead = readSync(fd, this.buffer, done, size - done, done);
        if (bytesRead === 0) break;
        done += bytesRead;
      }
      this.sinceYield += done;
      return this.buffer.subarray(0, done);
    } catch (e) {
      throw new SourceError(path, `cannot read the file: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
    } finally {
      if (fd !== undefined) closeSync(fd);
    }
  }
}

interface FolderScan {
  frames: DicomFrame[];
  skipped: string[];
  fileCount: number;
}

const nameIn = (folder: string, file: string): string => relative(folder, file).split(sep).join('/');

/** First pass: every file's header, for sorting and checking; no pixel data is kept. */
async function scanFolder(folder: string, reader: FileReader): Promise<FolderScan> {
  const files = await listFiles(folder);
  const frames: DicomFrame[] = [];
  const skipped: string[] = [];
  for (const file of files) {
    const name = nameIn(folder, file);
    const bytes = await reader.read(file);
    if (!isPart10(bytes)) {
      skipped.push(`${name} (not DICOM Part 10)`);
      continue;
    }
    const content = parseDicomFile(bytes, file, name);
    if (content.kind === 'no-image') skipped.push(`${name} (${content.why})`);
    else frames.push(...content.frames);
  }
  return { frames, skipped, fileCount: files.length };
}

function skippedNote(skipped: string[]): string {
  const shown = skipped.slice(0, 5).join(', ');
  return `skipped ${skipped.length} file(s) that hold no DICOM image: ${shown}${skipped.length > 5 ? ', ...' : ''}`;
}

/** The series in a folder, for reports; throws only when the folder cannot be read. */
export async function listDicomSeries(path: string): Promise<SeriesSummary[]> {
  const scan = await scanFolder(resolve(path), new FileReader());
  return summarize(splitSeries(scan.frames));
}

/**
 * Reads a folder holding one DICOM series: headers first (order, checks), then each file again,
 * in slice order, decoding its frames straight into the volume and hashing its bytes.
 */
export async function readDicomFolder(path: string): Promise<Volume> {
  const folder = resolve(path);
  const reader = new FileReader();
  const scan = await scanFolder(folder, reader);
  if (scan.frames.length === 0) {
    throw new SourceError(folder, `holds no DICOM image (${scan.fileCount} file(s)${scan.skipped.length ? `; ${skippedNote(scan.skipped)}` : ''})`);
  }
  const groups = splitSeries(scan.frames);
  if (groups.size > 1) throw severalSeries(folder, summarize(groups));
  const { sorted, volume } = planSeries(scan.frames, folder, { path: folder, format: 'dicom', sha256: '' });
  const slotOf = new Map(sorted.map((f, i) => [f.name, i]));
  const hash = createHash('sha256');
  for (const file of [...new Set(sorted.map((f) => f.file))]) {
    const bytes = await reader.read(file);
    hash.update(bytes);
    const content = isPart10(bytes) ? parseDicomFile(bytes, file, nameIn(folder, file)) : null;
    const frames = content?.kind === 'image' ? content.frames : [];
    for (const f of frames) {
      const slot = slotOf.get(f.name);
      if (slot === undefined || f.rows !== volume.rows || f.columns !== volume.columns) continue;
      fillSlice(volume, slot, f);
      slotOf.delete(f.name);
    }
  }
  const unfilled = [...slotOf.keys()];
  if (unfilled.length) throw new SourceError(folder, `${unfilled[0]} changed while the series was being read; read it again`);
  volume.provenance.sha256 = hash.digest('hex');
  volume.range ??= [0, 0];
  if (scan.skipped.length) volume.notes = [...(volume.notes ?? []), skippedNote(scan.skipped)];
  return volume;
}
