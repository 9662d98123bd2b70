import Database from 'better-sqlite3';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { openDatabase } from '../../app/store/open.ts';
import { migrate, readerMigrations, workspaceMigrations } from '../../app/store/migrations.ts';
import { currentScores, openReaderAnswers, recordSubmission } from '../../app/store/reader-answers.ts';
import { DatabaseLockedError } from '../../app/store/lock.ts';
import { tempDir } from './helpers.ts';

describe('store', () => {
  it('applies migrations once, records the version, and sets WAL, foreign keys and synchronous=FULL', () => {
    const file = join(tempDir(), 'workspace.sqlite');
    const a = openDatabase(file, 'workspace');
    expect(a.db.pragma('user_version', { simple: true })).toBe(workspaceMigrations.at(-1)!.version);
    expect(a.db.pragma('journal_mode', { simple: true })).toBe('wal');
    expect(a.db.pragma('foreign_keys', { simple: true })).toBe(1);
    expect(a.db.pragma('synchronous', { simple: true })).toBe(2); // 2 = FULL
    const tables = (a.db.prepare("SELECT name FROM sqlite_master WHERE type = 'table' ORDER BY name").all() as { name: string }[]).map((t) => t.name);
    expect(tables).toEqual(expect.arrayContaining(['study', 'method', 'study_case', 'series', 'reader', 'kit', 'kit_item', 'answer', 'audit']));
    a.close();
    const b = openDatabase(file, 'workspace'); // reopening runs nothing twice
    expect(b.db.pragma('user_version', { simple: true })).toBe(workspaceMigrations.at(-1)!.version);
    b.close();
  });

  it('refuses a database written by a newer Veil, naming the file', () => {
    const file = join(tempDir(), 'answers.sqlite');
    const raw = new Database(file);
    raw.pragma(`user_version = ${readerMigrations.length + 5}`);
    raw.close();
    expect(() => openDatabase(file, 'reader')).toThrow(/answers\.sqlite was written by a newer Veil/);
  });

  it('finishes the tables of an answer database left by a kill between its migrations, or left empty', () => {
    const dir = tempDir();
    // Killed after the first migration committed: the later tables are missing.
    const partial = join(dir, 'partial.sqlite');
    const raw = new Database(partial);
    migrate(raw, readerMigrations.slice(0, 1), partial);
    raw.close();
    // Killed after the file was made, before any table: an empty file.
    const empty = join(dir, 'empty.sqlite');
    writeFileSync(empty, '');
    for (const file of [partial, empty]) {
      const { db, close } = openReaderAnswers(file, 'kit-1', 'R1');
      expect(db.pragma('user_version', { simple: true })).toBe(readerMigrations.at(-1)!.version);
      recordSubmission(db, { itemId: 'x1', scores: { q: 2 }, seconds: 1 });
      expect(currentScores(db).get('x1')).toEqual({ q: 2 });
      close();
    }
  });

  it('keeps answers append-only: a change is a new revision, updates and deletes are refused', () => {
    const file = join(tempDir(), 'answers.sqlite');
    const { db, close } = openReaderAnswers(file, 'kit-1', 'R1');
    recordSubmission(db, { itemId: 'x1', scores: { q: 2, r: 3 }, seconds: 4.5 });
    recordSubmission(db, { itemId: 'x1', scores: { q: 5 }, seconds: 1 });
    expect(currentScores(db).get('x1')).toEqual({ q: 5, r: 3 });
    const revs = db.prepare("SELECT score, revision FROM answer WHERE item_id = 'x1' AND question_id = 'q' ORDER BY revision").all();
    expect(revs).toEqual([{ score: 2, revision: 1 }, { score: 5, revision: 2 }]);
    expect(() => db.prepare('UPDATE answer SET score = 1').run()).toThrow(/append-only/);
    expect(() => db.prepare('DELETE FROM answer').run()).toThrow(/append-only/);
    close();
  });

  it('refuses to mix answers of two kits in one file', () => {
    const file = join(tempDir(), 'answers.sqlite');
    openReaderAnswers(file, 'kit-1', 'R1').close();
    expect(() => openReaderAnswers(file, 'kit-2', 'R1')).toThrow(/holds answers for another kit \(kit-1/);
  });

  it('gives a second writer a clear message, and takes over a lock left by a dead process', () => {
    const file = join(tempDir(), 'workspace.sqlite');
    const first = openDatabase(file, 'workspace');
    expect(() => openDatabase(file, 'workspace')).toThrow(DatabaseLockedError);
    // Another process trying to write is told who holds the database.
    const script = `import('${join(import.meta.dirname, '..', '..', 'app', 'store', 'open.ts')}').then(m => { try { m.openDatabase(${JSON.stringify(file)}, 'workspace'); console.log('opened'); } catch (e) { console.log(e.message); } })`;
    const other = spawnSync(process.execPath, ['--import', 'tsx', '-e', script], { encoding: 'utf8' });
    expect(other.stdout).toContain(`already open for writing by another Veil process (pid ${process.pid}`);
    // Reading stays possible.
    const reader = openDatabase(file, 'workspace', { readonly: true });
    reader.close();
    first.close();
    // A lock whose process is gone (a crash) does not block the next writer.
    const dead = spawnSync(process.execPath, ['--import', 'tsx', '-e',
      `import('${join(import.meta.dirname, '..', '..', 'app', 'store', 'open.ts')}').then(m => { m.openDatabase(${JSON.stringify(file)}, 'workspace'); process.exit(0); })`]);
    expect(dead.status).toBe(0);
    const again = openDatabase(file, 'workspace');
    again.close();
  });
});
