/**
 * Kits and results bundles: integrity of kits, tamper detection of bundles, idempotent collect,
 * conflicts, and unblinding into the workspace.
 */
import Database from 'better-sqlite3';
import { spawnSync } from 'node:child_process';
import { appendFileSync, existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createApi } from '../../app/api.ts';
import { buildStudy } from '../../app/blinding/build.ts';
import { collectBundles } from '../../app/blinding/collect.ts';
import { verifyKitIntegrity } from '../../app/blinding/kit-integrity.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { openWorkspace, unblindedRatings } from '../../app/store/workspace.ts';
import { writeTinyStudy } from './helpers.ts';

async function built(readers = ['R1', 'R2']) {
  const { dir, template } = writeTinyStudy({ readers });
  const out = join(dir, 'study');
  await buildStudy(loadTemplate(template), out);
  return out;
}

async function answerAndExport(out: string, reader: string, n: number, score = 3, from = 0): Promise<string> {
  const api = createApi(out);
  try {
    const kit = await api.openKit({ reader });
    for (const it of kit.items.slice(from, n)) await api.submitAnswer({ reader, itemId: it.id, scores: { sharpness: score, noise: 2 }, seconds: 3 });
    return (await api.exportResults({ reader })).file;
  } finally {
    api.close();
  }
}

describe('kit integrity', () => {
  it('accepts a fresh kit and names the file when one is missing, changed or added', async () => {
    const out = await built();
    const kit = join(out, 'kits', 'R1');
    expect(verifyKitIntegrity(kit, { hashAll: true }).files.length).toBeGreaterThan(6);
    const manifest = JSON.parse(readFileSync(join(kit, 'kit.json'), 'utf8'));
    const img = join(kit, manifest.items[0].views[0].image);
    const bytes = readFileSync(img);
    bytes[bytes.length - 1] ^= 0xff;
    writeFileSync(img, bytes);
    expect(() => verifyKitIntegrity(kit, { hashAll: true })).toThrow(new RegExp(`${manifest.items[0].views[0].image}.*changed`));
    // The reading room refuses the changed image when it is read, naming it.
    const api = createApi(out);
    try {
      const k = await api.openKit({ reader: 'R1' });
      await expect(api.itemPixels({ reader: 'R1', itemId: k.items[0].id })).rejects.toThrow(/has been changed/);
    } finally { api.close(); }
    rmSync(img);
    expect(() => verifyKitIntegrity(kit)).toThrow(/is missing from the kit/);
    writeFileSync(img, bytes);
    writeFileSync(join(kit, 'images', 'extra.npy'), 'x');
    expect(() => verifyKitIntegrity(kit)).toThrow(/extra\.npy does not belong to the kit/);
  });

  it('opens a kit whose answer database a kill left with a rollback journal beside it', async () => {
    const out = await built();
    const kit = join(out, 'kits', 'R1');
    // A kill while the new answer database was still in rollback-journal mode leaves
    // answers.sqlite-journal; here a child writes in that mode and kills itself mid-transaction.
    const file = join(kit, 'answers.sqlite');
    const child = spawnSync(process.execPath, ['-e', `
      const Database = require('better-sqlite3');
      const db = new Database(${JSON.stringify(file)});
      db.pragma('cache_size = 1');
      db.exec('BEGIN; CREATE TABLE spill (x BLOB)');
      for (let i = 0; i < 200; i++) db.prepare('INSERT INTO spill VALUES (randomblob(4000))').run();
      process.kill(process.pid, 'SIGKILL');`], { cwd: join(import.meta.dirname, '..', '..') });
    expect(child.signal).toBe('SIGKILL');
    expect(existsSync(`${file}-journal`)).toBe(true);
    const api = createApi(out);
    try {
      const k = await api.openKit({ reader: 'R1' });
      await api.submitAnswer({ reader: 'R1', itemId: k.items[0].id, scores: { sharpness: 4, noise: 2 }, seconds: 2 });
      expect((await api.openKit({ reader: 'R1' })).answers[k.items[0].id]).toEqual({ sharpness: 4, noise: 2 });
    } finally { api.close(); }
    // SQLite rolled the cut transaction back when the database was opened.
    const db = new Database(file, { readonly: true });
    try {
      expect(db.prepare("SELECT COUNT(*) AS n FROM sqlite_master WHERE name = 'spill'").get()).toEqual({ n: 0 });
    } finally { db.close(); }
  });

  it('refuses to open a kit whose manifest was edited', async () => {
    const out = await built();
    const file = join(out, 'kits', 'R2', 'kit.json');
    writeFileSync(file, readFileSync(file, 'utf8').replace('"sessions": 1', '"sessions": 2 '));
    const api = createApi(out);
    try {
      await expect(api.openKit({ reader: 'R2' })).rejects.toThrow(/kit\.json has been changed/);
    } finally { api.close(); }
  });
});

describe('results bundles and collect', () => {
  it('unblinds a bundle into the workspace; the same bundle twice changes nothing', async () => {
    const out = await built();
    const bundle = await answerAndExport(out, 'R1', 2, 4);
    const first = collectBundles(out, [bundle]);
    expect(first).toMatchObject([{ status: 'imported', reader: 'R1', added: 4 }]);
    const again = collectBundles(out, [bundle]);
    expect(again).toMatchObject([{ status: 'unchanged', added: 0 }]);
    const ws = openWorkspace(join(out, 'workspace.sqlite'), { readonly: true });
    const rows = unblindedRatings(ws.db);
    ws.close();
    expect(rows).toHaveLength(4);
    expect(rows.every((r) => r.reader === 'R1' && r.source === 'collected' && ['m-alpha', 'm-beta'].includes(r.method))).toBe(true);
    expect(rows.filter((r) => r.question === 'sharpness').every((r) => r.score === 4)).toBe(true);
  });

  it('takes a later export of the same kit as an update and adds only what is new', async () => {
    const out = await built();
    const early = await answerAndExport(out, 'R1', 1);
    const later = await answerAndExport(out, 'R1', 3, 3, 1);
    expect(collectBundles(out, [early])[0]).toMatchObject({ status: 'imported', added: 2 });
    // The later export holds the first item again and two more: only those two are new.
    expect(collectBundles(out, [later])[0]).toMatchObject({ status: 'updated', added: 4 });
    const db = new Database(join(out, 'workspace.sqlite'), { readonly: true });
    expect((db.prepare('SELECT COUNT(DISTINCT item_id) AS n FROM answer').get() as { n: number }).n).toBe(3);
    db.close();
  });

  it('refuses edited, truncated and foreign bundles with the reason, and imports nothing from them', async () => {
    const out = await built();
    const bundle = await answerAndExport(out, 'R1', 2);
    const text = readFileSync(bundle, 'utf8');

    const edited = bundle.replace('.veil-results.json', '-edited.veil-results.json');
    const b = JSON.parse(text);
    b.tables.answer[0].score = b.tables.answer[0].score === 1 ? 2 : 1;
    writeFileSync(edited, JSON.stringify(b));
    const truncated = bundle.replace('.veil-results.json', '-cut.veil-results.json');
    writeFileSync(truncated, text.slice(0, Math.floor(text.length / 2)));
    const dropped = bundle.replace('.veil-results.json', '-dropped.veil-results.json');
    const d = JSON.parse(text);
    d.tables.answer.pop();
    writeFileSync(dropped, JSON.stringify(d));

    const other = await built();
    const foreign = await answerAndExport(other, 'R1', 1);

    const res = collectBundles(out, [edited, truncated, dropped, foreign]);
    expect(res.map((r) => r.status)).toEqual(['refused', 'refused', 'refused', 'refused']);
    expect(res[0].reason).toMatch(/edited, truncated, or made for another kit/);
    expect(res[1].reason).toMatch(/not JSON.*truncated/);
    expect(res[2].reason).toMatch(/edited, truncated/);
    expect(res[3].reason).toMatch(/does not belong to this study/);
    const db = new Database(join(out, 'workspace.sqlite'), { readonly: true });
    expect((db.prepare('SELECT COUNT(*) AS n FROM answer').get() as { n: number }).n).toBe(0);
    db.close();
  });

  it('reports a conflict when one reader sends two bundles that disagree', async () => {
    const out = await built();
    const a = await answerAndExport(out, 'R2', 1, 2);
    // A second copy of the kit, answered differently, then exported: the chains diverge.
    const copy = readFileSync(a, 'utf8');
    rmSync(join(out, 'kits', 'R2', 'answers.sqlite'));
    for (const s of ['-wal', '-shm']) rmSync(join(out, 'kits', 'R2', `answers.sqlite${s}`), { force: true });
    const b = await answerAndExport(out, 'R2', 1, 5);
    writeFileSync(a, copy);
    expect(collectBundles(out, [a])[0].status).toBe('imported');
    const second = collectBundles(out, [b])[0];
    expect(second.status).toBe('conflict');
    expect(second.reason).toMatch(/R2 already sent a different bundle/);
  });

  it('collects nothing when interrupted: one transaction for all bundles', async () => {
    const out = await built();
    const ok = await answerAndExport(out, 'R1', 2);
    const ws = openWorkspace(join(out, 'workspace.sqlite'));
    // A writer holding the workspace makes the collect fail before anything is written.
    expect(() => collectBundles(out, [ok])).toThrow(/already open for writing/);
    ws.close();
    appendFileSync(ok, '');
    expect(collectBundles(out, [ok])[0].status).toBe('imported');
  });
});

describe('collect into a workspace that already holds answers', () => {
  it('adds collected answers as new revisions after simulated ones, and never twice', async () => {
    const out = await built();
    const { addWorkspaceAnswers } = await import('../../app/store/workspace.ts');
    const ws = openWorkspace(join(out, 'workspace.sqlite'));
    const items = ws.db.prepare("SELECT item_id FROM kit_item WHERE reader_code = 'R1' ORDER BY position").all() as { item_id: string }[];
    addWorkspaceAnswers(ws.db, [{ itemId: items[0].item_id, questionId: 'sharpness', score: 1, seconds: null, source: 'simulated' }]);
    ws.close();
    const bundle = await answerAndExport(out, 'R1', 1, 5);
    expect(collectBundles(out, [bundle])[0]).toMatchObject({ status: 'imported', added: 2 });
    const db = new Database(join(out, 'workspace.sqlite'), { readonly: true });
    const rows = db.prepare("SELECT score, revision, source, reader_revision FROM answer WHERE question_id = 'sharpness' ORDER BY revision").all();
    db.close();
    expect(rows).toEqual([
      { score: 1, revision: 1, source: 'simulated', reader_revision: null },
      { score: 5, revision: 2, source: 'collected', reader_revision: 1 },
    ]);
  });
});

describe('comments and flags travel with the scores', () => {
  it('are unblinded beside each rating and reach the tidy CSV', async () => {
    const { dir, template } = writeTinyStudy({ readers: ['R1'] });
    const { readFileSync: read, writeFileSync: write } = await import('node:fs');
    write(template, read(template, 'utf8').replace('    text: How sharp?\n', '    text: How sharp?\n    comment: true\n'));
    const out = join(dir, 'study');
    await buildStudy(loadTemplate(template), out);
    const api = createApi(out);
    let file: string;
    try {
      const kit = await api.openKit({ reader: 'R1' });
      await api.submitAnswer({ reader: 'R1', itemId: kit.items[0].id, scores: { sharpness: 2, noise: 3 }, seconds: 4, comments: { sharpness: 'soft rim at 3 o\'clock' } });
      await api.submitAnswer({ reader: 'R1', itemId: kit.items[1].id, scores: { sharpness: 4, noise: 4 }, seconds: 4, flag: { reason: 'unrelated-artifact', note: 'motion' } });
      file = (await api.exportResults({ reader: 'R1' })).file;
    } finally {
      api.close();
    }
    expect(collectBundles(out, [file])[0].status).toBe('imported');
    const ws = openWorkspace(join(out, 'workspace.sqlite'), { readonly: true });
    const rows = unblindedRatings(ws.db);
    ws.close();
    expect(rows.filter((r) => r.comment).map((r) => [r.question, r.comment])).toEqual([['sharpness', 'soft rim at 3 o\'clock']]);
    expect(rows.filter((r) => r.flag).map((r) => r.flag)).toEqual(['unrelated-artifact', 'unrelated-artifact']);
    expect(collectBundles(out, [file])[0].status).toBe('unchanged');
  });
});
