/** The coordinator's override of a washout lock: signed, per kit, audited; forged ones do nothing. */
import Database from 'better-sqlite3';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createApi } from '../../app/api.ts';
import { buildStudy } from '../../app/blinding/build.ts';
import { runCli, type CliIO } from '../../app/cli.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { writeTinyStudy } from './helpers.ts';

async function twoSessionStudy(): Promise<string> {
  const { dir, template } = writeTinyStudy({ readers: ['R1', 'R2'], sessions: 2, extraYaml: '  washout_days: 14\n' });
  await buildStudy(loadTemplate(template), join(dir, 'study'));
  return join(dir, 'study');
}

async function finishSession1(out: string, reader: string): Promise<string> {
  const api = createApi(out);
  try {
    const kit = await api.openKit({ reader });
    const first = kit.items.filter((i) => i.session === 1);
    for (const it of first) await api.submitAnswer({ reader, itemId: it.id, scores: { sharpness: 3, noise: 2 }, seconds: 1 });
    return kit.items.find((i) => i.session === 2)!.id;
  } finally {
    api.close();
  }
}

const io = (): CliIO & { text: string } => { const o = { text: '', isTTY: false, out(t: string) { o.text += t; }, err(t: string) { o.text += t; } }; return o; };

describe('washout override', () => {
  it('opens the next session early for the named reader only, and writes the audit log', async () => {
    const out = await twoSessionStudy();
    const s2R1 = await finishSession1(out, 'R1');
    const s2R2 = await finishSession1(out, 'R2');
    const before = createApi(out);
    try {
      await expect(before.submitAnswer({ reader: 'R1', itemId: s2R1, scores: { sharpness: 3, noise: 2 }, seconds: 1 })).rejects.toThrow(/washout of 14 days/);
    } finally { before.close(); }

    const cli = io();
    expect(await runCli(['unlock', out, '--reader', 'R1', '--session', '2', '--reason', 'reader leaves the study early'], { serve: async () => undefined }, cli)).toBe(0);
    expect(cli.text).toContain('Session 2 of R1 opens now');

    const after = createApi(out);
    try {
      const kit = await after.openKit({ reader: 'R1' });
      expect((kit as unknown as { sessionStates: { session: number; open: boolean }[] }).sessionStates?.find((s) => s.session === 2)?.open ?? true).toBe(true);
      await after.submitAnswer({ reader: 'R1', itemId: s2R1, scores: { sharpness: 4, noise: 2 }, seconds: 1 });
      await expect(after.submitAnswer({ reader: 'R2', itemId: s2R2, scores: { sharpness: 4, noise: 2 }, seconds: 1 })).rejects.toThrow(/washout/);
    } finally { after.close(); }

    const db = new Database(join(out, 'workspace.sqlite'), { readonly: true });
    const logged = db.prepare("SELECT detail FROM audit WHERE action = 'washout.override'").all() as { detail: string }[];
    db.close();
    expect(logged.map((l) => JSON.parse(l.detail))).toMatchObject([{ reader: 'R1', session: 2, reason: 'reader leaves the study early' }]);
  });

  it('ignores an override that was edited or copied into another reader\'s kit', async () => {
    const out = await twoSessionStudy();
    const s2R2 = await finishSession1(out, 'R2');
    expect(await runCli(['unlock', out, '--reader', 'R1', '--session', '2', '--reason', 'test'], { serve: async () => undefined }, io())).toBe(0);
    const file = join(out, 'kits', 'R1', 'overrides', 'session-2.json');
    // Copied to R2's kit: it names R1's kit, so it does not count.
    const { mkdirSync } = await import('node:fs');
    mkdirSync(join(out, 'kits', 'R2', 'overrides'), { recursive: true });
    writeFileSync(join(out, 'kits', 'R2', 'overrides', 'session-2.json'), readFileSync(file));
    // Edited to name R2's kit: the signature no longer matches.
    const forged = JSON.parse(readFileSync(file, 'utf8'));
    forged.kitId = JSON.parse(readFileSync(join(out, 'kits', 'R2', 'kit.json'), 'utf8')).kitId;
    writeFileSync(join(out, 'kits', 'R2', 'overrides', 'forged.json'), JSON.stringify(forged));
    const api = createApi(out);
    try {
      await expect(api.submitAnswer({ reader: 'R2', itemId: s2R2, scores: { sharpness: 4, noise: 2 }, seconds: 1 })).rejects.toThrow(/washout/);
    } finally { api.close(); }
  });

  it('refuses session 1, unknown readers and an empty reason, exit 1', async () => {
    const out = await twoSessionStudy();
    for (const args of [['--reader', 'R1', '--session', '1', '--reason', 'x'], ['--reader', 'R9', '--session', '2', '--reason', 'x'], ['--reader', 'R1', '--session', '2', '--reason', ' ']]) {
      const o = io();
      expect(await runCli(['unlock', out, ...args], { serve: async () => undefined }, o)).toBe(1);
      expect(o.text).toMatch(/session must be a whole number from 2|no kit for reader 'R9'|give the reason/);
    }
  });
});
