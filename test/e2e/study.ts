/**
 * Small invented studies for the reading-room tests: synthetic phantom volumes written as .npy,
 * a template with the questions and design a test needs, built with `veil build` as a
 * coordinator would.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeNpy } from '../../app/images/npy.ts';
import { INTEGRITY_FILE, newSigningKey, writeKitIntegrity } from '../../app/blinding/kit-integrity.ts';
import type { KitManifest, KitWindowPreset } from '../../app/blinding/kit-format.ts';
import { REPO } from './host.ts';

export interface StudyOptions {
  questions: string;
  design: string;
  readers?: string[];
  cases?: number;
  size?: number;
  slices?: number;
}

/** A disc with soft texture; `blur` > 0 smooths it, `noise` adds a fixed ripple, per method. */
function phantom(size: number, slices: number, caseNo: number, method: number): Float32Array {
  const out = new Float32Array(size * size * slices);
  const c = size / 2;
  for (let s = 0; s < slices; s++) {
    const r = size * (0.3 + 0.02 * s + 0.01 * caseNo);
    for (let y = 0; y < size; y++) {
      for (let x = 0; x < size; x++) {
        const d = Math.hypot(x - c, y - c);
        const edge = method === 0 ? (d < r ? 1 : 0) : 1 / (1 + Math.exp((d - r) / 1.5));
        const inner = Math.hypot(x - c * 0.8, y - c * 1.1) < size * 0.08 ? 0.5 : 0;
        const ripple = method === 0 ? 0.06 * Math.sin((x * 7 + y * 3 + s) * 0.9) : 0;
        out[(s * size + y) * size + x] = Math.max(0, 100 * (edge * (0.6 + inner) + ripple));
      }
    }
  }
  return out;
}

export function makeStudy(opts: StudyOptions): string {
  const dir = mkdtempSync(join(tmpdir(), 'veil-e2e-study-'));
  const size = opts.size ?? 64;
  const slices = opts.slices ?? 4;
  for (let c = 1; c <= (opts.cases ?? 2); c++) {
    const caseDir = join(dir, 'sources', `case-${c}`);
    mkdirSync(caseDir, { recursive: true });
    for (const [m, name] of ['a', 'b'].entries()) writeFileSync(join(caseDir, `${name}.npy`), writeNpy(phantom(size, slices, c, m), [slices, size, size]));
  }
  const template = join(dir, 'e2e.study.yaml');
  writeFileSync(template, `# Invented test study: synthetic phantoms, no patient data.
title: Disc phantom (test)
seed: 4711
sources: sources
methods:
  - {id: m-sharp, label: Sharp reconstruction, path: "{case}/a.npy"}
  - {id: m-smooth, label: Smooth reconstruction, path: "{case}/b.npy"}
cases: auto
${opts.questions}
readers: [${(opts.readers ?? ['R1']).join(', ')}]
design:
${opts.design}
`);
  const r = spawnSync(process.execPath, [join(REPO, 'bin', 'veil.mjs'), 'build', template, '--out', join(dir, 'study')], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`veil build failed: ${r.stdout}${r.stderr}`);
  return join(dir, 'study');
}

/**
 * Window presets written into a built kit's manifest by hand (the kit field exists; the template
 * has no presets key yet), the kit then signed afresh as the build would.
 */
export function addPresets(studyDir: string, reader: string, presets: KitWindowPreset[]): void {
  const kitDir = join(studyDir, 'kits', reader);
  const file = join(kitDir, 'kit.json');
  const manifest = JSON.parse(readFileSync(file, 'utf8')) as KitManifest;
  const integrity = JSON.parse(readFileSync(join(kitDir, INTEGRITY_FILE), 'utf8')) as { bundleKey: string };
  writeFileSync(file, JSON.stringify({ ...manifest, presets }, null, 1));
  writeKitIntegrity(kitDir, manifest.kitId, integrity.bundleKey, newSigningKey());
}
