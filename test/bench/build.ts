/**
 * Kit building speed and memory: 40 cases x 4 methods of 256x256x32 int16 volumes, 5 readers
 * (so every volume is written 5 times, once per kit). Reported as bytes of kit images written per
 * second against `cp -r` copying the same number of bytes in the same run (goal: at least half of
 * cp's rate), and the peak resident memory of the build process (goal: under 1 GB).
 * The build runs in a child process so its peak memory (getrusage maxRSS, worker threads included)
 * is its own, with the environment `veil build` gives itself (bin/huge-pages.mjs). Both timed runs
 * start after `sync`, so neither pays for the other's writeback.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeNpy } from '../../app/images/npy.ts';
// @ts-expect-error a plain ES module of the launchers, without types
import { withHugePages, withoutHugePages } from '../../bin/huge-pages.mjs';

const REPO = join(import.meta.dirname, '..', '..');
const CASES = 40;
const METHODS = ['m-a', 'm-b', 'm-c', 'm-d'];
const READERS = ['R1', 'R2', 'R3', 'R4', 'R5'];
const SHAPE = [32, 256, 256];

function dirBytes(dir: string): number {
  let n = 0;
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    n += e.isDirectory() ? dirBytes(p) : statSync(p).size;
  }
  return n;
}

function writeSources(root: string): void {
  const px = new Int16Array(SHAPE[0] * SHAPE[1] * SHAPE[2]);
  for (let c = 0; c < CASES; c++) {
    const dir = join(root, 'data', `case-${String(c + 1).padStart(2, '0')}`);
    mkdirSync(dir, { recursive: true });
    METHODS.forEach((m, k) => {
      for (let i = 0; i < px.length; i++) px[i] = ((i * (k + 3) + c * 7) % 2000) - 100;
      writeFileSync(join(dir, `${m}.npy`), writeNpy(px, SHAPE));
    });
  }
  writeFileSync(join(root, 'bench.study.yaml'), `title: Bench study
seed: 7
sources: data
methods:
${METHODS.map((m) => `  - {id: ${m}, label: Method ${m}, path: "{case}/${m}.npy"}`).join('\n')}
cases: auto
questions:
  - {id: q, text: Quality?, scale: {points: 5, low: Poor, high: Excellent}}
readers: [${READERS.join(', ')}]
design: {sessions: 2}
`);
}

export async function bench(): Promise<string[]> {
  const root = mkdtempSync(join(tmpdir(), 'veil-bench-build-'));
  try {
    writeSources(root);
    const script = `
      const { buildStudy } = await import(${JSON.stringify(join(REPO, 'app', 'blinding', 'build.ts'))});
      const { loadTemplate } = await import(${JSON.stringify(join(REPO, 'app', 'study', 'parse-template.ts'))});
      const t0 = performance.now();
      await buildStudy(loadTemplate(${JSON.stringify(join(root, 'bench.study.yaml'))}), ${JSON.stringify(join(root, 'out'))});
      const ms = performance.now() - t0;
      console.log(JSON.stringify({ ms, maxRssKb: process.resourceUsage().maxRSS }));`;
    // Each timed run starts with no writeback pending from earlier writes (the sources, the kits).
    spawnSync('sync');
    const r = spawnSync(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', script], { cwd: REPO, encoding: 'utf8', maxBuffer: 1 << 24, env: withHugePages() });
    if (r.status !== 0) throw new Error(`build bench failed: ${r.stderr}`);
    const { ms, maxRssKb } = JSON.parse(r.stdout.trim().split('\n').at(-1)!) as { ms: number; maxRssKb: number };
    const written = dirBytes(join(root, 'out', 'kits'));
    spawnSync('sync');
    const t0 = performance.now();
    const cp = spawnSync('cp', ['-r', join(root, 'out', 'kits'), join(root, 'kits-copy')], { env: withoutHugePages() });
    const cpMs = performance.now() - t0;
    if (cp.status !== 0) throw new Error('cp failed');
    const veilRate = written / (ms / 1000);
    const cpRate = written / (cpMs / 1000);
    const mb = (b: number) => `${(b / 1e6).toFixed(0)} MB/s`;
    return [
      `kit build, ${CASES} cases x ${METHODS.length} methods x ${READERS.length} readers (256x256x32 int16), ${(written / 1e9).toFixed(2)} GB of kits: ` +
        `${(ms / 1000).toFixed(1)} s, ${mb(veilRate)} vs cp -r ${mb(cpRate)} (${(veilRate / cpRate).toFixed(2)}x of cp; goal >= 0.5x)`,
      `kit build peak memory (maxRSS): ${(maxRssKb / 1024).toFixed(0)} MB (goal < 1024 MB)`,
    ];
  } finally {
    rmSync(root, { recursive: true, force: true });
  }
}
