import Database from 'better-sqlite3';
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildStudy, BuildError } from '../../app/blinding/build.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { readNpy } from '../../app/images/npy.ts';
import type { KitManifest } from '../../app/blinding/kit-format.ts';
import { writeTinyStudy } from './helpers.ts';

describe('veil build', () => {
  it('writes a workspace with the key and one kit per reader without method names or paths', async () => {
    const { dir, template } = writeTinyStudy();
    const out = join(dir, 'study');
    const summary = await buildStudy(loadTemplate(template), out);
    expect(summary.cases).toBe(3);
    expect(summary.itemsPerReader).toBe(6);
    expect(readdirSync(join(out, 'kits')).sort()).toEqual(['R1', 'R2']);

    const db = new Database(join(out, 'workspace.sqlite'), { readonly: true });
    const key = db.prepare('SELECT item_id, reader_code, case_id, method_id FROM kit_item').all() as { item_id: string; method_id: string }[];
    expect(key).toHaveLength(12);
    expect((db.prepare('SELECT generator, seed FROM study').get() as { generator: string; seed: number }).generator).toMatch(/MT19937/);
    expect((db.prepare('SELECT COUNT(*) AS n FROM series').get() as { n: number }).n).toBe(9);
    db.close();

    for (const r of ['R1', 'R2']) {
      const kitDir = join(out, 'kits', r);
      const manifestText = readFileSync(join(kitDir, 'kit.json'), 'utf8');
      const manifest = JSON.parse(manifestText) as KitManifest;
      expect(manifest.items).toHaveLength(6);
      // Nothing about the method reaches the kit: not in the manifest, not in file names.
      for (const secret of ['m-alpha', 'm-beta', 'Alpha reconstruction', 'Beta reconstruction', 'a.npy', 'b.npy', 'ref.npy', dir]) {
        expect(manifestText).not.toContain(secret);
      }
      for (const f of readdirSync(join(kitDir, 'images'))) expect(f).toMatch(/^[0-9a-z]{10}\.npy$/);
      const first = manifest.items[0];
      const v = readNpy(readFileSync(join(kitDir, first.views[0].image)), first.views[0].image);
      expect([v.slices, v.rows, v.columns]).toEqual([2, 8, 8]);
      expect(Math.max(...v.pixels)).toBeLessThanOrEqual(65535);
    }
  });

  it('reproduces the same schedule and ids from the same seed, and different ones from another seed', async () => {
    const orderOf = async (seed: number) => {
      const { dir, template } = writeTinyStudy({ seed });
      await buildStudy(loadTemplate(template), join(dir, 'out'));
      const db = new Database(join(dir, 'out', 'workspace.sqlite'), { readonly: true });
      const rows = db.prepare('SELECT item_id, reader_code, case_id, method_id, position FROM kit_item ORDER BY reader_code, position').all();
      db.close();
      return rows;
    };
    expect(await orderOf(5)).toEqual(await orderOf(5));
    expect(await orderOf(5)).not.toEqual(await orderOf(6));
  });

  it('changes nothing when a source is bad, and names the file', async () => {
    const { dir, template } = writeTinyStudy();
    writeFileSync(join(dir, 'data', 'c3', 'b.npy'), Buffer.from('not a numpy file'));
    const out = join(dir, 'study');
    await expect(buildStudy(loadTemplate(template), out)).rejects.toThrow(/c3[/\\]b\.npy/);
    expect(existsSync(join(out, 'workspace.sqlite'))).toBe(false);
    expect(existsSync(join(out, 'kits'))).toBe(false);
    expect(readdirSync(out)).toEqual([]);
  });

  it('names every case that lacks a method source', async () => {
    const { dir, template } = writeTinyStudy();
    const t = loadTemplate(template);
    writeFileSync(join(dir, 'data', 'c2', 'a.npy.bak'), '');
    const { rmSync } = await import('node:fs');
    rmSync(join(dir, 'data', 'c2', 'a.npy'));
    const err = await buildStudy(t, join(dir, 'o')).catch((e) => e);
    expect(err).toBeInstanceOf(BuildError);
    expect(err.message).toMatch(/case c2: missing m-alpha/);
  });

  it('refuses to build over an existing study', async () => {
    const { dir, template } = writeTinyStudy();
    await buildStudy(loadTemplate(template), join(dir, 'o'));
    await expect(buildStudy(loadTemplate(template), join(dir, 'o'))).rejects.toThrow(/already holds a built study/);
  });
});
