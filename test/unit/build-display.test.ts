/**
 * `veil build` applies the template's display policy: methods on another matrix are resampled to
 * the reference grid (or refused, with the setting that fixes it), and intensities are normalized
 * so that a global factor between methods does not reach the kit.
 */
import Database from 'better-sqlite3';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildStudy, BuildError } from '../../app/blinding/build.ts';
import { DISPLAY_MAX } from '../../app/blinding/display-scale.ts';
import type { KitManifest } from '../../app/blinding/kit-format.ts';
import { readNpy, writeNpy } from '../../app/images/npy.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { tempDir } from './helpers.ts';

/** One case: a 2 x 8 x 8 reference, method a = reference, method b = 9 x reference on a 4 x 4 matrix. */
function study(display: string): { dir: string; template: string } {
  const dir = tempDir('veil-build-display-');
  mkdirSync(join(dir, 'data', 'c1'), { recursive: true });
  const ref = Float32Array.from({ length: 128 }, (_, i) => 10 + ((i * 7) % 64));
  writeFileSync(join(dir, 'data', 'c1', 'ref.npy'), writeNpy(ref, [2, 8, 8]));
  writeFileSync(join(dir, 'data', 'c1', 'a.npy'), writeNpy(ref, [2, 8, 8]));
  const coarse = Float32Array.from({ length: 32 }, (_, i) => 9 * (10 + ((i * 7) % 64)));
  writeFileSync(join(dir, 'data', 'c1', 'b.npy'), writeNpy(coarse, [2, 4, 4]));
  const template = join(dir, 't.study.yaml');
  writeFileSync(template, `title: Invented display study
seed: 3
sources: data
reference: "{case}/ref.npy"
methods:
  - {id: m-a, label: A, path: "{case}/a.npy"}
  - {id: m-b, label: B, path: "{case}/b.npy"}
cases: auto
questions:
  - {id: q, text: Quality?, scale: {points: 5, low: Poor, high: Good}}
readers: [R1]
${display}
`);
  return { dir, template };
}

async function kitImages(dir: string, out: string): Promise<Record<string, { rows: number; columns: number; pixels: Float32Array }>> {
  const db = new Database(join(out, 'workspace.sqlite'), { readonly: true });
  const methodOf = new Map((db.prepare('SELECT item_id, method_id FROM kit_item').all() as { item_id: string; method_id: string }[]).map((r) => [r.item_id, r.method_id]));
  db.close();
  const manifest = JSON.parse(readFileSync(join(out, 'kits', 'R1', 'kit.json'), 'utf8')) as KitManifest;
  const images: Record<string, { rows: number; columns: number; pixels: Float32Array }> = {};
  for (const item of manifest.items) {
    const view = item.views[0];
    const v = readNpy(readFileSync(join(out, 'kits', 'R1', view.image)), view.image);
    expect([v.rows, v.columns]).toEqual([view.rows, view.columns]);
    images[methodOf.get(item.id)!] = { rows: view.rows, columns: view.columns, pixels: v.pixels };
  }
  return images;
}

describe('veil build applies the display policy', () => {
  it('refuses a method on another matrix than the reference under matching: none, naming the setting', async () => {
    const { dir, template } = study('');
    const err = await buildStudy(loadTemplate(template), join(dir, 'out')).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(BuildError);
    expect((err as Error).message).toMatch(/^case c1: m-b \(\S+b\.npy\) is 2x4x4 but \S+ref\.npy is 2x8x8 \(slices x rows x columns\); set display: \{matching: reference-grid\}/);
  });

  it('resamples to the reference grid and scales each image from its own percentiles', async () => {
    const { dir, template } = study('display: {matching: reference-grid}');
    const out = join(dir, 'out');
    await buildStudy(loadTemplate(template), out);
    const images = await kitImages(dir, out);
    expect([images['m-b'].rows, images['m-b'].columns]).toEqual([8, 8]);
    // b is 9 x the reference: after percentile scaling both fill the same display range.
    const top = (p: Float32Array) => Math.max(...p);
    expect(Math.abs(top(images['m-a'].pixels) - top(images['m-b'].pixels))).toBeLessThanOrEqual(0.05 * DISPLAY_MAX);
    expect(top(images['m-a'].pixels)).toBeGreaterThanOrEqual(DISPLAY_MAX);
    const manifest = readFileSync(join(out, 'kits', 'R1', 'kit.json'), 'utf8');
    expect(JSON.parse(manifest).items.every((i: KitManifest['items'][number]) => i.views[0].rows === 8)).toBe(true);
  });

  it('under intensity: none, both methods share the reference window and the factor shows', async () => {
    const { dir, template } = study('display: {matching: reference-grid, intensity: none}');
    const out = join(dir, 'out');
    await buildStudy(loadTemplate(template), out);
    const images = await kitImages(dir, out);
    expect(Math.max(...images['m-b'].pixels)).toBeGreaterThan(5 * Math.max(...images['m-a'].pixels));
  });

  it('under intensity: match-reference, the 9 x method lands on the reference values', async () => {
    const { dir, template } = study('display: {matching: reference-grid, intensity: match-reference}');
    const out = join(dir, 'out');
    await buildStudy(loadTemplate(template), out);
    const images = await kitImages(dir, out);
    const meanOf = (p: Float32Array) => p.reduce((a, b) => a + b, 0) / p.length;
    expect(Math.abs(meanOf(images['m-b'].pixels) - meanOf(images['m-a'].pixels))).toBeLessThan(0.01 * meanOf(images['m-a'].pixels));
  });
});
