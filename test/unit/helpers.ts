/** Shared fixtures for unit tests: a tiny study of .npy sources written to a temp folder. */
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeNpy } from '../../app/images/npy.ts';

export function tempDir(prefix = 'veil-test-'): string {
  return mkdtempSync(join(tmpdir(), prefix));
}

export interface TinyStudy { dir: string; template: string }

/** Three cases, two methods and a reference, 2 slices of 8x8 (or `shape`); two readers, two questions. */
export function writeTinyStudy(opts: { readers?: string[]; sessions?: number; seed?: number; extraYaml?: string; shape?: [number, number, number] } = {}): TinyStudy {
  const dir = tempDir();
  const shape = opts.shape ?? [2, 8, 8];
  const voxels = shape[0] * shape[1] * shape[2];
  for (const c of ['c1', 'c2', 'c3']) {
    mkdirSync(join(dir, 'data', c), { recursive: true });
    for (const [name, k] of [['ref', 1], ['a', 2], ['b', 3]] as const) {
      const px = new Float32Array(voxels).map((_, i) => ((i * k) % 17) + (c === 'c2' ? 5 : 0));
      writeFileSync(join(dir, 'data', c, `${name}.npy`), writeNpy(px, shape));
    }
  }
  const template = join(dir, 'tiny.study.yaml');
  writeFileSync(template, `title: Tiny phantom study
seed: ${opts.seed ?? 1234}
sources: data
reference: "{case}/ref.npy"
methods:
  - id: m-alpha
    label: Alpha reconstruction
    path: "{case}/a.npy"
  - id: m-beta
    label: Beta reconstruction
    path: "{case}/b.npy"
cases: auto
questions:
  - id: sharpness
    text: How sharp?
    scale: {points: 5, low: Blurred, high: Crisp}
  - id: noise
    text: How clean?
    scale: {points: 4, low: Noisy, high: Clean}
readers: [${(opts.readers ?? ['R1', 'R2']).join(', ')}]
design:
  sessions: ${opts.sessions ?? 1}
${opts.extraYaml ?? ''}`);
  return { dir, template };
}
