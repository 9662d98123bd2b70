/**
 * Kits packed for transfer (`veil build --zip`): the archive unpacks into the kit folder, byte for
 * byte, which the reading room then opens and verifies; its entries carry no date; and the build
 * command prints where each archive is.
 */
import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { strToU8, unzipSync, zipSync } from 'fflate';
import { describe, expect, it } from 'vitest';
import { buildStudy } from '../../app/blinding/build.ts';
import { unpackKit } from '../../app/blinding/kit-unzip.ts';
import { listFiles, INTEGRITY_FILE } from '../../app/blinding/kit-integrity.ts';
import { createApi } from '../../app/api.ts';
import { runCli } from '../../app/cli.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { tempDir, writeTinyStudy } from './helpers.ts';

/** The DOS date of every entry, from the central directory (PKWARE APPNOTE 4.3.12 and 4.3.16). */
function entryDates(zip: Uint8Array): number[] {
  const v = new DataView(zip.buffer, zip.byteOffset, zip.byteLength);
  let end = zip.length - 22;
  while (end >= 0 && v.getUint32(end, true) !== 0x06054b50) end--;
  const count = v.getUint16(end + 10, true);
  const dates: number[] = [];
  for (let i = 0, at = v.getUint32(end + 16, true); i < count; i++) {
    expect(v.getUint32(at, true)).toBe(0x02014b50);
    dates.push(v.getUint16(at + 14, true));
    at += 46 + v.getUint16(at + 28, true) + v.getUint16(at + 30, true) + v.getUint16(at + 32, true);
  }
  return dates;
}

describe('kits zipped for transfer', () => {
  it('unpack into the kit folder byte for byte, and the unpacked kit opens and verifies', async () => {
    const { dir, template } = writeTinyStudy();
    const out = join(dir, 'study');
    const summary = await buildStudy(loadTemplate(template), out, undefined, undefined, { zip: true });
    for (const k of summary.kits) {
      expect(k.zip).toBe(join(out, 'kits', `${k.reader}.zip`));
      const zip = readFileSync(k.zip!);
      const members = unzipSync(zip);
      const expected = [INTEGRITY_FILE, ...listFiles(k.path)].map((f) => `${k.reader}/${f}`).sort();
      expect(Object.keys(members).sort()).toEqual(expected);
      for (const [name, bytes] of Object.entries(members)) {
        expect(Buffer.from(bytes).equals(readFileSync(join(out, 'kits', name))), name).toBe(true);
      }
      // 1980-01-01 as a DOS date: ((1980 - 1980) << 9) | (1 << 5) | 1.
      const dates = entryDates(zip);
      expect(dates).toHaveLength(expected.length);
      expect(new Set(dates)).toEqual(new Set([(1 << 5) | 1]));
    }

    // A reader unpacks R1.zip elsewhere and opens the kit there.
    const elsewhere = tempDir('veil-unzipped-');
    for (const [name, bytes] of Object.entries(unzipSync(readFileSync(summary.kits[0].zip!)))) {
      mkdirSync(dirname(join(elsewhere, name)), { recursive: true });
      writeFileSync(join(elsewhere, name), bytes);
    }
    const api = createApi(join(elsewhere, 'R1'));
    try {
      const kit = await api.openKit({ reader: 'R1' });
      expect(kit.items).toHaveLength(summary.kits[0].items);
    } finally {
      api.close();
    }
  });

  it('leaves a kit too large for plain ZIP unzipped and says why, instead of writing a broken archive', async () => {
    const { dir, template } = writeTinyStudy();
    const out = join(dir, 'study');
    const summary = await buildStudy(loadTemplate(template), out, undefined, undefined, { zip: true, zipMaxBytes: 1000 });
    for (const k of summary.kits) {
      expect(k.zip).toBeUndefined();
      expect(k.zipSkipped).toMatch(new RegExp(`^kit ${k.reader} holds \\d+\\.\\d+ GB, more than one ZIP archive without ZIP64 takes .*; send its folder instead$`));
      expect(existsSync(join(out, 'kits', `${k.reader}.zip`))).toBe(false);
      expect(existsSync(join(k.path, 'kit.json'))).toBe(true);
    }
  });

  it('veil build --zip names each archive', async () => {
    const { dir, template } = writeTinyStudy();
    let text = '';
    const code = await runCli(['build', template, '--out', join(dir, 'study'), '--zip'], { serve: async () => {} }, { out: (t) => (text += t), err: () => {}, isTTY: false });
    expect(code).toBe(0);
    expect(text).toContain(`for transfer: ${join(dir, 'study', 'kits', 'R2.zip')}`);
  });
});

describe('kit archives unpacked for reading (veil serve R1.zip)', () => {
  async function zippedKit(): Promise<{ zip: string; items: number; reader: string }> {
    const { dir, template } = writeTinyStudy();
    const summary = await buildStudy(loadTemplate(template), join(dir, 'study'), undefined, undefined, { zip: true });
    const k = summary.kits[0];
    // The reader's machine: the archive alone in a downloads folder.
    const downloads = tempDir('veil-downloads-');
    const zip = join(downloads, `${k.reader}.zip`);
    writeFileSync(zip, readFileSync(k.zip!));
    return { zip, items: k.items, reader: k.reader };
  }

  it('unpacks beside the archive once, serves the folder, and keeps the answers on a second open', async () => {
    const { zip, items, reader } = await zippedKit();
    let served = '';
    const messages: string[] = [];
    const io = { out: () => {}, err: (t: string) => messages.push(t), isTTY: false };
    const code = await runCli(['serve', zip, '--no-open'], { serve: async (d) => { served = d; } }, io);
    expect(code).toBe(0);
    expect(served).toBe(join(dirname(zip), reader));
    expect(messages.join('')).toContain(`Kit unpacked to ${served}`);
    const api = createApi(served);
    try {
      expect((await api.openKit({ reader })).items).toHaveLength(items);
    } finally {
      api.close();
    }
    writeFileSync(join(served, 'marker-of-answers'), 'kept');
    expect(unpackKit(zip)).toEqual({ dir: served, unpacked: false });
    expect(readFileSync(join(served, 'marker-of-answers'), 'utf8')).toBe('kept');
  });

  it('never overwrites a folder that holds another kit or other files', async () => {
    const { zip, reader } = await zippedKit();
    mkdirSync(join(dirname(zip), reader));
    writeFileSync(join(dirname(zip), reader, 'notes.txt'), 'mine');
    expect(() => unpackKit(zip)).toThrow(/already exists and holds other files; move it away/);
    expect(readFileSync(join(dirname(zip), reader, 'notes.txt'), 'utf8')).toBe('mine');
  });

  it('refuses entries that would land outside the kit folder, and archives that are not kits, writing nothing', () => {
    const downloads = tempDir('veil-downloads-');
    const evil = join(downloads, 'R9.zip');
    writeFileSync(evil, zipSync({ 'R9/kit.json': strToU8('{"kitId":"x"}'), 'R9/../../escaped.txt': strToU8('x') }));
    expect(() => unpackKit(evil)).toThrow(/entry 'R9\/\.\.\/\.\.\/escaped\.txt' would land outside the kit folder/);
    expect(readdirSync(downloads)).toEqual(['R9.zip']);
    const other = join(downloads, 'photos.zip');
    writeFileSync(other, zipSync({ 'photos/a.txt': strToU8('x') }));
    expect(() => unpackKit(other)).toThrow(/holds no kit\.json under one top folder: not a Veil kit archive/);
    writeFileSync(join(downloads, 'cut.zip'), readFileSync(evil).subarray(0, 40));
    expect(() => unpackKit(join(downloads, 'cut.zip'))).toThrow(/cut\.zip: no ZIP end-of-directory record/);
  });
});
