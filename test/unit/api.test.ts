import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createApi } from '../../app/api.ts';
import { buildStudy } from '../../app/blinding/build.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { writeTinyStudy } from './helpers.ts';

async function builtStudy() {
  const { dir, template } = writeTinyStudy({ sessions: 2 });
  const out = join(dir, 'study');
  await buildStudy(loadTemplate(template), out);
  return out;
}

describe('API', () => {
  it('opens a kit with no method names, serves pixels and tracks progress', async () => {
    const api = createApi(await builtStudy());
    try {
      expect((await api.info()).mode).toBe('study');
      expect((await api.listReaders()).map((r) => r.reader)).toEqual(['R1', 'R2']);
      const kit = await api.openKit({ reader: 'R1' });
      expect(JSON.stringify(kit)).not.toMatch(/m-alpha|m-beta|Alpha|Beta|\.npy/);
      expect(kit.progress).toEqual({ answered: 0, total: 6, next: 0 });
      const px = new Uint16Array(await api.itemPixels({ reader: 'R1', itemId: kit.items[0].id }));
      await expect(api.itemPixels({ reader: "R1", itemId: kit.items[0].id, view: 1 })).rejects.toThrow(/has no view 1/);
      expect(px.length).toBe(2 * 8 * 8);

      const r = await api.submitAnswer({ reader: 'R1', itemId: kit.items[0].id, scores: { sharpness: 3, noise: 4 }, seconds: 2.5 });
      expect(r.progress).toEqual({ answered: 1, total: 6, next: 1 });
      const again = await api.openKit({ reader: 'R1' });
      expect(again.answers[kit.items[0].id]).toEqual({ sharpness: 3, noise: 4 });
    } finally {
      api.close();
    }
  });

  it('refuses incomplete or out-of-scale answers with a message naming the question', async () => {
    const api = createApi(await builtStudy());
    try {
      const kit = await api.openKit({ reader: 'R2' });
      const itemId = kit.items[0].id;
      await expect(api.submitAnswer({ reader: 'R2', itemId, scores: { sharpness: 3 }, seconds: 1 })).rejects.toThrow(/question 'noise' has no score/);
      await expect(api.submitAnswer({ reader: 'R2', itemId, scores: { sharpness: 3, noise: 5 }, seconds: 1 })).rejects.toThrow(/'noise': score must be a whole number from 1 to 4, got 5/);
      await expect(api.submitAnswer({ reader: 'R2', itemId, scores: { sharpness: 2.5, noise: 1 }, seconds: 1 })).rejects.toThrow(/'sharpness'/);
      await expect(api.submitAnswer({ reader: 'R2', itemId, scores: { sharpness: 2, noise: 1, extra: 1 }, seconds: 1 })).rejects.toThrow(/unknown question 'extra'/);
      await expect(api.submitAnswer({ reader: 'R2', itemId: 'nope', scores: { sharpness: 2, noise: 1 }, seconds: 1 })).rejects.toThrow(/no item 'nope'/);
      await expect(api.openKit({ reader: 'R9' })).rejects.toThrow(/no kit for reader 'R9'.*R1, R2/);
      expect((await api.openKit({ reader: 'R2' })).progress.answered).toBe(0);
    } finally {
      api.close();
    }
  });

  it('serves a single kit folder on its own', async () => {
    const out = await builtStudy();
    const api = createApi(join(out, 'kits', 'R2'));
    try {
      expect((await api.info()).mode).toBe('kit');
      expect((await api.listReaders()).map((r) => r.reader)).toEqual(['R2']);
    } finally {
      api.close();
    }
  });

  it('says clearly when a folder holds no kit', () => {
    expect(() => createApi('/tmp')).toThrow(/holds no reading kit/);
  });
});
