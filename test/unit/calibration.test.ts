/** Calibration items: first in every kit with their intended scores, answered, never analysed. */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createApi } from '../../app/api.ts';
import { buildStudy } from '../../app/blinding/build.ts';
import { collectBundles } from '../../app/blinding/collect.ts';
import { loadTemplate, parseTemplate } from '../../app/study/parse-template.ts';
import { openWorkspace, unblindedRatings } from '../../app/store/workspace.ts';
import { writeTinyStudy } from './helpers.ts';

const CALIBRATION = 'calibration:\n  - {path: c1/ref.npy, scores: {sharpness: 5, noise: 4}, note: The fully sampled image}\n  - {path: c2/a.npy, scores: {sharpness: 2}}\n';

describe('calibration items', () => {
  it('come first in every kit with their intended scores, and their answers stay out of the analysis', async () => {
    const { dir, template } = writeTinyStudy({ extraYaml: CALIBRATION });
    const out = join(dir, 'study');
    const summary = await buildStudy(loadTemplate(template), out);
    const api = createApi(out);
    try {
      const kit = await api.openKit({ reader: 'R1' });
      expect(kit.items).toHaveLength(summary.itemsPerReader + 2);
      expect(kit.items.slice(0, 2).map((i) => i.calibration)).toEqual([
        { scores: { sharpness: 5, noise: 4 }, note: 'The fully sampled image' },
        { scores: { sharpness: 2 }, note: '' },
      ]);
      expect(kit.items.slice(2).every((i) => !i.calibration)).toBe(true);
      expect(kit.items[0].session).toBe(1);
      const other = await api.openKit({ reader: 'R2' });
      expect(other.items[0].id).not.toBe(kit.items[0].id);
      // The reader answers a calibration item and a study item; only the study item is analysed.
      for (const it of kit.items.slice(0, 3)) await api.submitAnswer({ reader: 'R1', itemId: it.id, scores: { sharpness: 3, noise: 3 }, seconds: 1 });
      const { file } = await api.exportResults({ reader: 'R1' });
      expect(collectBundles(out, [file])[0]).toMatchObject({ status: 'imported', added: 2 });
    } finally {
      api.close();
    }
    const ws = openWorkspace(join(out, 'workspace.sqlite'), { readonly: true });
    expect(unblindedRatings(ws.db)).toHaveLength(2);
    ws.close();
  });

  it('names the question and the line when a calibration score is wrong', () => {
    const text = readFileSync(writeTinyStudy({ extraYaml: 'calibration:\n  - {path: c1/ref.npy, scores: {clarity: 3, sharpness: 9}}\n' }).template, 'utf8');
    expect(() => parseTemplate(text, 'c.study.yaml')).toThrow(/calibration\[0\]\.scores\.clarity: 'clarity' is not a question/);
    expect(() => parseTemplate(text, 'c.study.yaml')).toThrow(/c\.study\.yaml:\d+.*calibration\[0\]\.scores\.sharpness: the intended score must be from 1 to 5, got 9/);
  });
});
