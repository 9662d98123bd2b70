/**
 * A kit archive made by `veil build --zip` (./kit-zip.ts) unpacked for reading: `veil serve
 * R1.zip` unpacks it beside itself, into the folder the archive names (R1/), and serves that.
 *
 * Read through the ZIP central directory (PKWARE APPNOTE 4.3.12–4.3.16), one entry at a time, each
 * inflated with node:zlib within the size the directory states, so memory holds one file at a time
 * and a damaged archive cannot inflate without bound. Only what such an archive holds is accepted:
 * one top folder, stored or deflated entries, no encryption, no ZIP64, and no entry that would land
 * outside the folder. The kit's signed integrity.json then checks every file when it is opened, as
 * for a kit copied as a folder. Unpacking goes to a temporary folder renamed at the end, so a
 * failure leaves nothing half-written; an archive already unpacked there is reused, with the
 * reader's answers in it, and a folder holding another kit is never overwritten.
 */
import { closeSync, existsSync, fstatSync, mkdirSync, openSync, readFileSync, readSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { basename, dirname, join, resolve, sep } from 'node:path';
import { inflateRawSync } from 'node:zlib';
import { KIT_MANIFEST } from './kit-format.ts';

export class KitArchiveError extends Error {}

interface Entry { name: string; method: number; flags: number; compressed: number; size: number; offset: number }

const EOCD = 0x06054b50;
const CENTRAL = 0x02014b50;
const LOCAL = 0x04034b50;
const MAX_EOCD_SEARCH = 22 + 0xffff; // the record plus the longest comment

function readAt(fd: number, position: number, length: number): Buffer {
  const b = Buffer.alloc(length);
  let done = 0;
  while (done < length) {
    const n = readSync(fd, b, done, length - done, position + done);
    if (n === 0) break;
    done += n;
  }
  return b.subarray(0, done);
}

function entriesOf(fd: number, size: number, fail: (why: string) => never): Entry[] {
  const tailStart = Math.max(0, size - MAX_EOCD_SEARCH);
  const tail = readAt(fd, tailStart, size - tailStart);
  let at = tail.length - 22;
  while (at >= 0 && tail.readUInt32LE(at) !== EOCD) at--;
  if (at < 0) fail('no ZIP end-of-directory record: not a ZIP archive, or cut short');
  const count = tail.readUInt16LE(at + 10);
  const dirSize = tail.readUInt32LE(at + 12);
  const dirOffset = tail.readUInt32LE(at + 16);
  if (count === 0xffff || dirSize === 0xffffffff || dirOffset === 0xffffffff) fail('ZIP64 archives are not read; unpack it with your system\'s tools');
  if (dirOffset + dirSize > size) fail('the ZIP directory runs past the end of the file (cut short?)');
  const dir = readAt(fd, dirOffset, dirSize);
  const out: Entry[] = [];
  for (let p = 0, i = 0; i < count; i++) {
    if (p + 46 > dir.length || dir.readUInt32LE(p) !== CENTRAL) fail(`ZIP directory entry ${i + 1} is damaged`);
    const nameLength = dir.readUInt16LE(p + 28);
    const entry: Entry = {
      flags: dir.readUInt16LE(p + 8),
      method: dir.readUInt16LE(p + 10),
      compressed: dir.readUInt32LE(p + 20),
      size: dir.readUInt32LE(p + 24),
      offset: dir.readUInt32LE(p + 42),
      name: dir.toString('utf8', p + 46, p + 46 + nameLength),
    };
    if (entry.compressed === 0xffffffff || entry.size === 0xffffffff || entry.offset === 0xffffffff) fail('ZIP64 archives are not read; unpack it with your system\'s tools');
    out.push(entry);
    p += 46 + nameLength + dir.readUInt16LE(p + 30) + dir.readUInt16LE(p + 32);
  }
  return out;
}

/** The entry's path inside the kit folder, or why it is refused. */
function pathInKit(name: string, top: string): string | null {
  if (name.includes('\\') || name.startsWith('/') || /^[A-Za-z]:/.test(name)) return null;
  const parts = name.split('/');
  if (parts[0] !== top || parts.some((x) => x === '..' || x === '.')) return null;
  return parts.slice(1).join('/');
}

/** The kit id in a kit.json's bytes, or null. */
function kitIdOf(bytes: Buffer): string | null {
  try {
    const id = (JSON.parse(bytes.toString('utf8')) as { kitId?: unknown }).kitId;
    return typeof id === 'string' ? id : null;
  } catch {
    return null;
  }
}

/** Unpacks a kit archive beside itself (once); returns the kit folder and whether it was unpacked now. */
export function unpackKit(zipPath: string): { dir: string; unpacked: boolean } {
  const zip = resolve(zipPath);
  const fail: (why: string) => never = (why) => {
    throw new KitArchiveError(`${zip}: ${why}`);
  };
  if (!existsSync(zip)) fail('file not found');
  const fd = openSync(zip, 'r');
  let temp: string | null = null;
  try {
    const entries = entriesOf(fd, fstatSync(fd).size, fail);
    const files = entries.filter((e) => !e.name.endsWith('/'));
    const top = files[0]?.name.split('/')[0] ?? '';
    if (!top || !files.some((e) => e.name === `${top}/${KIT_MANIFEST}`)) fail(`holds no ${KIT_MANIFEST} under one top folder: not a Veil kit archive`);
    const target = join(dirname(zip), top);

    const read = (e: Entry): Buffer => {
      if (e.flags & 0x1) fail(`${e.name} is encrypted; Veil's kit archives are not`);
      const local = readAt(fd, e.offset, 30);
      if (local.length < 30 || local.readUInt32LE(0) !== LOCAL) fail(`${e.name}: damaged local header`);
      const start = e.offset + 30 + local.readUInt16LE(26) + local.readUInt16LE(28);
      const data = readAt(fd, start, e.compressed);
      if (data.length !== e.compressed) fail(`${e.name} is cut short`);
      if (e.method === 0) return data;
      if (e.method !== 8) fail(`${e.name} uses compression method ${e.method}; Veil reads stored and deflated entries`);
      try {
        const out = inflateRawSync(data, { maxOutputLength: Math.max(1, e.size) });
        if (out.length !== e.size) fail(`${e.name} inflates to ${out.length} bytes, not the ${e.size} the archive states`);
        return out;
      } catch (err) {
        if (err instanceof KitArchiveError) throw err;
        return fail(`${e.name} cannot be inflated: ${(err as Error).message}`);
      }
    };

    const manifest = read(files.find((e) => e.name === `${top}/${KIT_MANIFEST}`)!);
    if (existsSync(target)) {
      const present = existsSync(join(target, KIT_MANIFEST)) ? kitIdOf(readFileSync(join(target, KIT_MANIFEST))) : null;
      if (present !== null && present === kitIdOf(manifest)) return { dir: target, unpacked: false }; // keep the reader's answers
      fail(`${target} already exists and holds ${present ? 'another kit' : 'other files'}; move it away to unpack this kit there`);
    }
    temp = join(dirname(zip), `.${top}.unpacking-${process.pid}`);
    rmSync(temp, { recursive: true, force: true });
    for (const e of files) {
      const rel = pathInKit(e.name, top);
      if (rel === null || rel === '') fail(`entry '${e.name}' would land outside the kit folder ${top}${sep}; refused`);
      const dest = join(temp, rel);
      mkdirSync(dirname(dest), { recursive: true });
      writeFileSync(dest, read(e));
    }
    renameSync(temp, target);
    temp = null;
    return { dir: target, unpacked: true };
  } finally {
    closeSync(fd);
    if (temp) rmSync(temp, { recursive: true, force: true });
  }
}

/**
 * The folder to open for a study folder, kit folder or kit archive (`veil serve`, `npm start`):
 * an archive is unpacked beside itself the first time, and `say` tells the user where it went.
 */
export function kitFolderFor(path: string, say: (line: string) => void): string {
  if (!basename(path).toLowerCase().endsWith('.zip')) return path;
  const { dir, unpacked } = unpackKit(path);
  say(unpacked ? `Kit unpacked to ${dir}; Veil reads and answers it there.` : `Kit already unpacked at ${dir}; opening it there, answers included.`);
  return dir;
}
