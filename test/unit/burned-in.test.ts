/**
 * Burned-in text (DICOM BurnedInAnnotation, PS3.15 Annex E Clean Pixel Data): listed by veil
 * check, refused by the build without regions, blacked out in the kit image with them.
 */
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildStudy } from '../../app/blinding/build.ts';
import type { KitManifest } from '../../app/blinding/kit-format.ts';
import { writeDicomSeries } from '../../app/images/dicom-write.ts';
import { readNpy } from '../../app/images/npy.ts';
import { IDENTITY_ORIENTATION } from '../../app/images/volume.ts';
import { checkStudy } from '../../app/study/check.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';

function study(burnedIn: string): string {
  const dir = mkdtempSync(join(tmpdir(), 'veil-burned-'));
  for (const c of ['c1', 'c2']) {
    for (const [m, stated] of [['a', true], ['b', false]] as const) {
      const folder = join(dir, 'data', c, m);
      mkdirSync(folder, { recursive: true });
      const pixels = new Float32Array(2 * 32 * 32).map((_, i) => 100 + (i % 37));
      const files = writeDicomSeries({ columns: 32, rows: 32, slices: 2, spacing: [1, 1, 2], orientation: IDENTITY_ORIENTATION, pixels,
        provenance: { path: '', format: 'npy', sha256: '' } }, { burnedIn: stated });
      files.forEach((b, i) => writeFileSync(join(folder, `s${i}.dcm`), b));
    }
  }
  const t = join(dir, 'b.study.yaml');
  writeFileSync(t, `title: Burned-in text
seed: 5
sources: data
methods:
  - {id: m-a, label: A, path: "{case}/a"}
  - {id: m-b, label: B, path: "{case}/b"}
cases: auto
questions:
  - {id: q, text: Quality?, scale: {points: 5, low: Poor, high: Good}}
readers: [R1]
${burnedIn}`);
  return t;
}

describe('burned-in text', () => {
  it('veil check lists the series that say they carry it, and fails when no regions are given', async () => {
    const report = await checkStudy(loadTemplate(study('')));
    expect(report.ok).toBe(false);
    expect(report.problems.filter((p) => /BurnedInAnnotation YES/.test(p.message)).map((p) => p.case)).toEqual(['c1', 'c2']);
    const withRegions = await checkStudy(loadTemplate(study('burned_in:\n  regions: [{x: 0, y: 0, width: 10, height: 4}]\n')));
    expect(withRegions.ok).toBe(true);
    expect(withRegions.warnings.filter((w) => /burned-in text/.test(w.message)).map((w) => w.source)).toEqual(['m-a', 'm-a']);
  });

  it('the build refuses without regions, and blacks them out on every slice of the stated series only', async () => {
    await expect(buildStudy(loadTemplate(study('')), join(tmpdir(), `veil-burned-out-${process.pid}`))).rejects.toThrow(/burned_in\.regions/);
    const t = study('burned_in:\n  regions: [{x: 0, y: 0, width: 10, height: 4}]\n');
    const out = join(t, '..', 'out');
    await buildStudy(loadTemplate(t), out);
    const kit = JSON.parse(readFileSync(join(out, 'kits', 'R1', 'kit.json'), 'utf8')) as KitManifest;
    const ws = await import('better-sqlite3');
    const db = new ws.default(join(out, 'workspace.sqlite'), { readonly: true });
    const methodOf = new Map((db.prepare('SELECT item_id, method_id FROM kit_item').all() as { item_id: string; method_id: string }[]).map((r) => [r.item_id, r.method_id]));
    db.close();
    for (const item of kit.items) {
      const v = readNpy(readFileSync(join(out, 'kits', 'R1', item.views[0].image)), 'x');
      const at = (s: number, y: number, x: number) => v.pixels[(s * 32 + y) * 32 + x];
      const blacked = methodOf.get(item.id) === 'm-a';
      for (const s of [0, 1]) {
        expect(at(s, 2, 5) === 0, `${item.id} slice ${s}`).toBe(blacked);
        expect(at(s, 3, 9) === 0).toBe(blacked);
        expect(at(s, 4, 0)).toBeGreaterThan(0); // below the rectangle
        expect(at(s, 0, 10)).toBeGreaterThan(0); // right of it
      }
    }
  });

  it('apply: never is the coordinator saying the images were checked', async () => {
    const report = await checkStudy(loadTemplate(study('burned_in:\n  apply: never\n')));
    expect(report.ok).toBe(true);
    expect(report.warnings.some((w) => /check the images yourself/.test(w.message))).toBe(true);
  });
});
