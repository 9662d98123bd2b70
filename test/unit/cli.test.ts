import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, type CliHooks, type CliIO } from '../../app/cli.ts';
import { tempDir, writeTinyStudy } from './helpers.ts';

function capture(): CliIO & { stdout: string; stderr: string } {
  const io = { stdout: '', stderr: '', isTTY: false, out(t: string) { io.stdout += t; }, err(t: string) { io.stderr += t; } };
  return io;
}
const hooks: CliHooks = { serve: async () => undefined };
const run = async (args: string[]) => { const io = capture(); const code = await runCli(args, hooks, io); return { code, ...io }; };

describe('veil command line', () => {
  it('lists every command of the design in --help', async () => {
    const r = await run(['--help']);
    expect(r.code).toBe(0);
    for (const c of ['check', 'build', 'collect', 'report', 'agreement', 'metrics', 'serve', 'demo']) expect(r.stdout).toMatch(new RegExp(`\\n  ${c} `));
    expect(r.stdout).toContain('not a medical device');
  });

  it('has every command of the design built: none says it is not built yet', async () => {
    const help = await run(['--help']);
    expect(help.stdout).not.toContain('not built yet');
  });

  it('exits 2 on usage errors', async () => {
    expect((await run(['frobnicate'])).code).toBe(2);
    expect((await run(['build', 'x.study.yaml'])).code).toBe(2); // --out missing
  });

  it('check passes a good study and fails a broken one naming the file', async () => {
    const { dir, template } = writeTinyStudy();
    const ok = await run(['check', template]);
    expect(ok.code).toBe(0);
    expect(ok.stdout).toContain('OK: 3 cases ready to build');
    expect(ok.stdout).toContain('(slices, rows, columns)');
    writeFileSync(join(dir, 'data', 'c1', 'a.npy'), 'garbage');
    const bad = await run(['check', template, '--json']);
    expect(bad.code).toBe(1);
    const j = JSON.parse(bad.stdout);
    expect(j.ok).toBe(false);
    expect(j.problems.map((p: { message: string }) => p.message).join('\n')).toContain(join('c1', 'a.npy'));
  });

  it('reports template errors with file and line, exit 1', async () => {
    const dir = tempDir();
    const f = join(dir, 'bad.study.yaml');
    writeFileSync(f, 'title: x\nseed: -3\n');
    const r = await run(['check', f]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/bad\.study\.yaml:2/);
  });

  it('builds, reports tidy ratings and computes agreement', async () => {
    const { dir, template } = writeTinyStudy();
    const out = join(dir, 'study');
    const b = await run(['build', template, '--out', out, '--json']);
    expect(b.code).toBe(0);
    expect(JSON.parse(b.stdout).kits).toHaveLength(2);
    const rep = await run(['report', out, '--out', join(dir, 'report')]);
    expect(rep.code).toBe(0);
    expect(readFileSync(join(dir, 'report', 'ratings.csv'), 'utf8').split(/\r?\n/)[0]).toBe('case,reader,method,question,score,session,seconds,source,flag,comment');

    const csv = join(dir, 'ratings.csv');
    writeFileSync(csv, 'case,reader,method,question,score\n' + ['c1,R1,m,q,1', 'c1,R2,m,q,2', 'c2,R1,m,q,3', 'c2,R2,m,q,3', 'c3,R1,m,q,5', 'c3,R2,m,q,4'].join('\n') + '\n');
    const ag = await run(['agreement', csv, '--json']);
    expect(ag.code).toBe(0);
    const g = JSON.parse(ag.stdout).groups[0];
    expect(g).toMatchObject({ method: 'm', question: 'q', cases: 3, readers: 2, ratings: 6 });
    expect(typeof g.icc['ICC(2,1)'].value).toBe('number');
    const human = await run(['agreement', csv]);
    expect(human.stdout).toContain('ICC(2,1)');
    const missing = await run(['agreement', join(dir, 'nope.csv')]);
    expect(missing.code).toBe(1);
    expect(missing.stderr).toContain('nope.csv');
  });
});
