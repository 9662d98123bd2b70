/**
 * `veil build` on worker threads (app/blinding/build-workers.ts) writes what a build in one
 * thread writes: the same kit images, manifests' items, series, metrics and blinding check; and
 * a bad source met by a worker stops the build with the same message and changes nothing.
 */
import Database from 'better-sqlite3';
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildStudy, BuildError } from '../../app/blinding/build.ts';
import { sha256Hex } from '../../app/blinding/kit-integrity.ts';
import type { KitManifest } from '../../app/blinding/kit-format.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { writeTinyStudy } from './helpers.ts';

/** Everything of a built study that does not depend on chance (kit ids and keys are random by design). */
function contents(out: string) {
  const db = new Database(join(out, 'workspace.sqlite'), { readonly: true });
  const rows = {
    series: db.prepare('SELECT id, case_id, method_id, role, path, sha256, columns, rows, slices FROM series ORDER BY id').all(),
    metrics: db.prepare('SELECT case_id, method_id, "values", detail FROM metric ORDER BY case_id, method_id').all(),
    kitItems: db.prepare('SELECT item_id, reader_code, position, session, case_id, method_id, series_id FROM kit_item ORDER BY reader_code, position').all(),
    blinding: (db.prepare('SELECT blinding FROM study').get() as { blinding: string }).blinding,
  };
  db.close();
  const kits = Object.fromEntries(readdirSync(join(out, 'kits')).map((r) => {
    const manifest = JSON.parse(readFileSync(join(out, 'kits', r, 'kit.json'), 'utf8')) as KitManifest;
    const images = Object.fromEntries(readdirSync(join(out, 'kits', r, 'images')).map((f) => [f, sha256Hex(readFileSync(join(out, 'kits', r, 'images', f)))]));
    return [r, { items: manifest.items, images }];
  }));
  return { rows, kits };
}

describe('veil build on worker threads', () => {
  it('writes the same study as a build in one thread, metrics and blinding check included', async () => {
    const { dir, template } = writeTinyStudy({ shape: [3, 24, 24], readers: ['R1', 'R2', 'R3'] });
    const t = loadTemplate(template);
    const one = await buildStudy(t, join(dir, 'one'), undefined, undefined, { threads: 0 });
    const progress: string[] = [];
    const many = await buildStudy(t, join(dir, 'many'), (p) => progress.push(p.what), undefined, { threads: 2 });
    expect(many.metrics).toBe(6);
    expect(many.metrics).toBe(one.metrics);
    expect(many.blinding).toEqual(one.blinding);
    expect(many.blinding).not.toBeNull();
    expect(progress).toHaveLength(9); // 3 cases x (reference + 2 methods)
    expect(contents(join(dir, 'many'))).toEqual(contents(join(dir, 'one')));
  });

  it('stops on a bad source met by a worker, names the file, and leaves the output folder empty', async () => {
    const { dir, template } = writeTinyStudy({ shape: [3, 24, 24] });
    writeFileSync(join(dir, 'data', 'c2', 'b.npy'), Buffer.from('not a numpy file'));
    const out = join(dir, 'study');
    await expect(buildStudy(loadTemplate(template), out, undefined, undefined, { threads: 2 })).rejects.toThrow(/c2\/b\.npy: not a NumPy \.npy file/);
    expect(existsSync(out) ? readdirSync(out) : []).toEqual([]);
  });

  it('stops at once when cancelled while workers run, and leaves the output folder empty', async () => {
    const { dir, template } = writeTinyStudy({ shape: [8, 64, 64] });
    const out = join(dir, 'study');
    const controller = new AbortController();
    let images = 0;
    const build = buildStudy(loadTemplate(template), out, () => {
      images++;
      controller.abort();
    }, controller.signal, { threads: 2 });
    await expect(build).rejects.toThrow(/abort/i);
    // Cancelled at the first image: the first case's three images are not all waited for.
    expect(images).toBeLessThan(3);
    expect(existsSync(out) ? readdirSync(out) : []).toEqual([]);
  });

  it('reports a grid problem found by a worker as a build error', async () => {
    const { dir, template } = writeTinyStudy({ shape: [3, 24, 24] });
    const { writeNpy } = await import('../../app/images/npy.ts');
    writeFileSync(join(dir, 'data', 'c3', 'a.npy'), writeNpy(new Float32Array(2 * 24 * 24), [2, 24, 24]));
    const e = await buildStudy(loadTemplate(template), join(dir, 'study'), undefined, undefined, { threads: 2 }).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(BuildError);
    expect((e as BuildError).message).toMatch(/^case c3: m-alpha \(.*c3\/a\.npy\) is 2x24x24 but .*ref\.npy is 3x24x24/);
  });
});
