import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createApi } from '../../app/api.ts';
import { buildStudy } from '../../app/blinding/build.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { addWorkspaceAnswers, openWorkspace, unblindedRatings, workspacePath } from '../../app/store/workspace.ts';
import { agreementReport } from '../../app/stats/agreement.ts';
import { writeTinyStudy } from './helpers.ts';

/** A built tiny study (3 cases, 2 methods, readers R1 R2, questions sharpness 1..5 and noise 1..4). */
async function studyWithAnswers(answer: boolean): Promise<string> {
  const { dir, template } = writeTinyStudy({ seed: 4321 });
  const out = join(dir, 'study');
  await buildStudy(loadTemplate(template), out);
  if (answer) {
    const ws = openWorkspace(workspacePath(out));
    try {
      const items = ws.db.prepare('SELECT item_id, reader_code, case_id, method_id FROM kit_item ORDER BY item_id').all() as
        { item_id: string; reader_code: string; case_id: string; method_id: string }[];
      addWorkspaceAnswers(ws.db, items.flatMap((it, i) => [
        { itemId: it.item_id, questionId: 'sharpness', score: 1 + ((i * 3 + it.case_id.length) % 5), seconds: null, source: 'collected' as const },
        { itemId: it.item_id, questionId: 'noise', score: 1 + (i % 4), seconds: null, source: 'collected' as const },
      ]));
    } finally {
      ws.close();
    }
  }
  return out;
}

describe('API agreement', () => {
  it('gives, for a study folder, the report `veil agreement` computes from the same ratings, seeded by the study', async () => {
    const dir = await studyWithAnswers(true);
    const api = createApi(dir);
    try {
      const got = await api.agreement({ bootstrap: 300 });
      const ws = openWorkspace(workspacePath(dir), { readonly: true });
      const rows = unblindedRatings(ws.db);
      ws.close();
      const want = agreementReport(rows, { scales: { sharpness: { points: 5 }, noise: { points: 4 } }, bootstrap: 300, seed: 4321 });
      expect(got).toEqual({ ...want, seedFrom: 'study' });
      expect(got.groups.map((g) => `${g.method}/${g.question}`)).toEqual([
        'm-alpha/noise', 'm-alpha/sharpness', 'm-beta/noise', 'm-beta/sharpness', '*/noise', '*/sharpness',
      ]);
      expect(got.groups[0].categories).toEqual([1, 2, 3, 4]);
      const filtered = await api.agreement({ question: 'noise', method: 'm-beta', bootstrap: 300, seed: 4321 });
      expect(filtered.seedFrom).toBe('request');
      expect(filtered.groups).toEqual([got.groups[2]]);
      await expect(api.agreement({ seed: -1 })).rejects.toThrow(/seed must be a whole number/);
    } finally {
      api.close();
    }
  });

  it('says so when nothing has been collected yet', async () => {
    const api = createApi(await studyWithAnswers(false));
    try {
      await expect(api.agreement()).rejects.toThrow(/no answers in the workspace yet/);
    } finally {
      api.close();
    }
  });

  it('refuses in a reading kit, which holds no key', async () => {
    const dir = await studyWithAnswers(true);
    const api = createApi(join(dir, 'kits', 'R1'));
    try {
      expect((await api.info()).mode).toBe('kit');
      await expect(api.agreement()).rejects.toMatchObject({ name: 'ApiError', status: 403, message: expect.stringMatching(/holds no key/) });
    } finally {
      api.close();
    }
  });
});
