/** The coordinator's operations through the API: build as a job (with cancel), collect, progress. */
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createApi } from '../../app/api.ts';
import type { JobView } from '../../app/api-contract.ts';
import { buildStudy } from '../../app/blinding/build.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { writeTinyStudy } from './helpers.ts';

async function waitForJob(api: ReturnType<typeof createApi>, id: string): Promise<JobView> {
  for (;;) {
    const j = await api.job({ id });
    if (j.state !== 'running') return j;
    await new Promise((r) => setTimeout(r, 10));
  }
}

describe('coordinator operations', () => {
  it('builds a study as a job with progress, and a cancelled build writes nothing', async () => {
    const first = writeTinyStudy();
    await buildStudy(loadTemplate(first.template), join(first.dir, 'study'));
    const api = createApi(join(first.dir, 'study'));
    try {
      const other = writeTinyStudy({ readers: ['A1', 'A2', 'A3'] });
      const started = await api.startBuild({ template: other.template, out: join(other.dir, 'built') });
      expect(started.state).toBe('running');
      const done = await waitForJob(api, started.id);
      expect(done.state).toBe('done');
      expect(done.progress).toMatchObject({ done: 9, total: 9 });
      expect((done.result as { readers: number }).readers).toBe(3);

      const cancelled = await api.startBuild({ template: other.template, out: join(other.dir, 'cancelled') });
      await api.cancelJob({ id: cancelled.id });
      const end = await waitForJob(api, cancelled.id);
      expect(end.state).toBe('cancelled');
      expect(existsSync(join(other.dir, 'cancelled', 'workspace.sqlite'))).toBe(false);
      expect(existsSync(join(other.dir, 'cancelled', 'kits'))).toBe(false);

      await expect(api.startBuild({ template: join(other.dir, 'missing.study.yaml'), out: join(other.dir, 'x') })).rejects.toThrow(/missing\.study\.yaml/);
    } finally {
      api.close();
    }
  });

  it('collects bundles given as text and shows each reader\'s progress', async () => {
    const { dir, template } = writeTinyStudy();
    const out = join(dir, 'study');
    await buildStudy(loadTemplate(template), out);
    const api = createApi(out);
    try {
      const before = await api.studyOverview();
      expect(before.readers.map((r) => [r.reader, r.items, r.answered, r.bundles])).toEqual([['R1', 6, 0, 0], ['R2', 6, 0, 0]]);
      const kit = await api.openKit({ reader: 'R2' });
      for (const it of kit.items.slice(0, 4)) await api.submitAnswer({ reader: 'R2', itemId: it.id, scores: { sharpness: 2, noise: 3 }, seconds: 7 });
      const { file } = await api.exportResults({ reader: 'R2' });
      const res = await api.collect({ bundles: [{ name: 'r2.veil-results.json', text: readFileSync(file, 'utf8') }, { name: 'junk.json', text: '{' }] });
      expect(res.map((r) => r.status)).toEqual(['imported', 'refused']);
      expect(res[1].reason).toMatch(/junk\.json/);
      const after = await api.studyOverview();
      const r2 = after.readers.find((r) => r.reader === 'R2')!;
      expect(r2).toMatchObject({ answered: 4, bundles: 1, medianSeconds: 7 });
      expect(r2.lastActivity).not.toBeNull();
    } finally {
      api.close();
    }
  });

  it('checks a template: the table of sources, then a refusal naming the line of a broken template', async () => {
    const { dir, template } = writeTinyStudy();
    await buildStudy(loadTemplate(template), join(dir, 'study'));
    const api = createApi(join(dir, 'study'));
    try {
      const check = await api.checkTemplate({ template });
      expect(check.ok).toBe(true);
      expect(check.sources).toHaveLength(9);
      expect(check.sources[0]).toMatchObject({ case: 'c1', shape: [2, 8, 8] });
      const { writeFileSync } = await import('node:fs');
      writeFileSync(join(dir, 'bad.study.yaml'), 'title: x\nseed: -1\n');
      await expect(api.checkTemplate({ template: join(dir, 'bad.study.yaml') })).rejects.toThrow(/bad\.study\.yaml:2/);
    } finally {
      api.close();
    }
  });

  it('refuses every coordinator operation on a reading kit', async () => {
    const { dir, template } = writeTinyStudy();
    await buildStudy(loadTemplate(template), join(dir, 'study'));
    const api = createApi(join(dir, 'study', 'kits', 'R1'));
    try {
      await expect(api.studyOverview()).rejects.toThrow(/holds no key/);
      await expect(api.collect({ bundles: [] })).rejects.toThrow(/holds no key/);
      await expect(api.startBuild({ template, out: join(dir, 'x') })).rejects.toThrow(/cannot build/);
    } finally {
      api.close();
    }
  });
});
