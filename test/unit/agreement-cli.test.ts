import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIO } from '../../app/cli.ts';
import { tempDir } from './helpers.ts';

async function veil(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const io: CliIO = { out: (t) => { stdout += t; }, err: (t) => { stderr += t; }, isTTY: false };
  const code = await runCli(args, { serve: async () => {} }, io);
  return { code, stdout, stderr };
}

const CSV = ['case,reader,method,question,score,session',
  'c1,R1,m-a,sharpness,1,1', 'c1,R2,m-a,sharpness,2,1', 'c2,R1,m-a,sharpness,3,1', 'c2,R2,m-a,sharpness,3,1',
  'c3,R1,m-a,sharpness,5,1', 'c3,R2,m-a,sharpness,4,2', 'c4,R1,m-a,sharpness,2,2', 'c4,R2,m-a,sharpness,2,2',
  'c1,R1,m-b,sharpness,2,1', 'c1,R2,m-b,sharpness,2,1', 'c2,R1,m-b,sharpness,4,1', 'c2,R2,m-b,sharpness,3,1',
  'c3,R1,m-b,sharpness,5,1', 'c3,R2,m-b,sharpness,5,2', 'c4,R1,m-b,sharpness,1,2', 'c4,R2,m-b,sharpness,2,2',
].join('\n') + '\n';

describe('veil agreement', () => {
  const dir = tempDir();
  const csv = join(dir, 'ratings.csv');
  writeFileSync(csv, CSV);

  it('prints the JSON of the issue: per-method groups, pooled "*" groups, bootstrap settings', async () => {
    const r = await veil(['agreement', csv, '--json', '--points', '5', '--bootstrap', '300', '--seed', '42']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.groups.map((g: { method: string }) => g.method)).toEqual(['m-a', 'm-b', '*']);
    expect(j.groups[0]).toMatchObject({ method: 'm-a', question: 'sharpness', cases: 4, readers: 2, ratings: 8, categories: [1, 2, 3, 4, 5] });
    expect(j.groups[2]).toMatchObject({ subject: 'case x method', cases: 8 });
    expect(j.bootstrap).toMatchObject({ resamples: 300, seed: 42 });
    expect(j.groups[0].fleiss_kappa.ci95).toHaveLength(2);
    // The same seed gives the same report; another seed other intervals.
    expect((await veil(['agreement', csv, '--json', '--points', '5', '--bootstrap', '300', '--seed', '42'])).stdout).toBe(r.stdout);
    const other = JSON.parse((await veil(['agreement', csv, '--json', '--points', '5', '--bootstrap', '300', '--seed', '43'])).stdout);
    const intervals = (report: { groups: { fleiss_kappa: unknown; krippendorff_alpha: unknown }[] }): string =>
      JSON.stringify(report.groups.map((g) => [g.fleiss_kappa, g.krippendorff_alpha]));
    expect(intervals(other)).not.toBe(intervals(j));
  });

  it('filters by --method and --question, and prints tables by default', async () => {
    const one = JSON.parse((await veil(['agreement', csv, '--json', '--method', 'm-b', '--bootstrap', '0'])).stdout);
    expect(one.groups).toHaveLength(1);
    expect(one.groups[0].fleiss_kappa.ci95).toBeNull();
    const none = await veil(['agreement', csv, '--question', 'noise']);
    expect(none.code).toBe(1);
    expect(none.stderr).toContain('no ratings match the filter');
    const human = await veil(['agreement', csv, '--bootstrap', '50']);
    expect(human.code).toBe(0);
    expect(human.stdout).toMatch(/m-a \/ sharpness: 4 cases, 2 readers, 8 ratings/);
    expect(human.stdout).toContain('all methods pooled');
    expect(human.stdout).toContain("Cohen's kappa, reader pair");
  });

  it('takes the scales from a study template and names the line of a score outside them', async () => {
    const template = join(dir, 'mini.study.yaml');
    writeFileSync(template, `title: Mini
seed: 1
sources: data
methods:
  - {id: m-a, label: A, path: "{case}/a.npy"}
  - {id: m-b, label: B, path: "{case}/b.npy"}
cases: auto
questions:
  - id: sharpness
    text: Sharp?
    scale: {points: 4, low: Blurred, high: Crisp}
readers: [R1, R2]
design: {sessions: 1}
`);
    const r = await veil(['agreement', csv, '--template', template]);
    expect(r.code).toBe(1);
    expect(r.stderr).toBe(`${csv}:6: column "score": 5 is outside the scale 1..4 of question "sharpness"\n`);
    writeFileSync(template, readFileSync(template, 'utf8').replace('points: 4', 'points: 6'));
    const ok = JSON.parse((await veil(['agreement', csv, '--template', template, '--json', '--bootstrap', '0'])).stdout);
    expect(ok.groups[0].categories).toEqual([1, 2, 3, 4, 5, 6]);
    expect(ok.groups[0].categories_from).toBe('scale');
  });

  it('usage errors exit 2: a non-number --bootstrap, --points with --template', async () => {
    expect((await veil(['agreement', csv, '--bootstrap', 'many'])).code).toBe(2);
    expect((await veil(['agreement', csv, '--points', '1'])).code).toBe(2);
    expect((await veil(['agreement', csv, '--points', '5', '--template', 'x.yaml'])).code).toBe(2);
  });

  it('a malformed CSV names the line', async () => {
    const bad = join(dir, 'bad.csv');
    writeFileSync(bad, 'case,reader,method,question,score\nc1,R1,m,q,2\nc1,R1,m,q,3\n');
    const r = await veil(['agreement', bad]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/bad\.csv:3: duplicate rating/);
  });
});
