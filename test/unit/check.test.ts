/**
 * `veil check` on whole studies: a valid study whose sources mix DICOM, NIfTI and NumPy passes with
 * its table; broken ones fail naming the case, the method and the file; differences readers could
 * see are blinding warnings with the template setting that removes them.
 */
import { cpSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { runCli, type CliHooks, type CliIO } from '../../app/cli.ts';
import { loadVolume } from '../../app/images/load.ts';
import { writeNpy } from '../../app/images/npy.ts';
import type { Volume } from '../../app/images/volume.ts';
import { checkStudy } from '../../app/study/check.ts';
import type { CheckReport } from '../../app/study/check.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';
import { tempDir } from './helpers.ts';

const DICOM = fileURLToPath(new URL('../reference/dicom/files/', import.meta.url));

/**
 * A NIfTI-1 file (float32, sform) holding a Volume with its DICOM geometry: the inverse of Veil's
 * mapping (LPS -> RAS+; i, j, k = columns, rows, slices), after the NIfTI-1 header layout.
 */
function niftiOf(v: Volume, scale = 1): Uint8Array {
  const out = new Uint8Array(352 + v.pixels.length * 4);
  const d = new DataView(out.buffer);
  d.setInt32(0, 348, true);
  [3, v.columns, v.rows, v.slices, 1, 1, 1, 1].forEach((x, i) => d.setInt16(40 + 2 * i, x, true));
  d.setInt16(70, 16, true); // float32
  d.setInt16(72, 32, true);
  [1, ...v.spacing, 1, 1, 1, 1].forEach((x, i) => d.setFloat32(76 + 4 * i, x, true));
  d.setFloat32(108, 352, true);
  out[123] = 2; // mm
  d.setInt16(254, 1, true); // sform_code
  const o = v.orientation;
  const n = [o[1] * o[5] - o[2] * o[4], o[2] * o[3] - o[0] * o[5], o[0] * o[4] - o[1] * o[3]];
  const cols = [o.slice(0, 3).map((x) => x * v.spacing[0]), o.slice(3).map((x) => x * v.spacing[1]), n.map((x) => x * v.spacing[2]), v.origin!];
  for (let r = 0; r < 3; r++) {
    const flip = r < 2 ? -1 : 1; // LPS -> RAS
    for (let c = 0; c < 4; c++) d.setFloat32(280 + 16 * r + 4 * c, flip * cols[c][r], true);
  }
  out.set([0x6e, 0x2b, 0x31, 0x00], 344);
  v.pixels.forEach((x, i) => d.setFloat32(352 + 4 * i, x * scale, true));
  return out;
}

/** Two cases; reference a DICOM series, methods a NIfTI (.nii.gz) and a NumPy file. */
async function mixedStudy(extraYaml = ''): Promise<{ dir: string; template: string; ref: Volume }> {
  const dir = tempDir('veil-check-');
  const ref = await loadVolume(join(DICOM, 'series-u16-explicit'));
  for (const c of ['case-01', 'case-02']) {
    const base = join(dir, 'data', c);
    mkdirSync(base, { recursive: true });
    cpSync(join(DICOM, 'series-u16-explicit'), join(base, 'scanner'), { recursive: true });
    writeFileSync(join(base, 'iterative.nii.gz'), gzipSync(niftiOf(ref, 1.02)));
    writeFileSync(join(base, 'network.npy'), writeNpy(ref.pixels.map((x) => x * 0.98), [ref.slices, ref.rows, ref.columns]));
  }
  const template = join(dir, 'mixed.study.yaml');
  writeFileSync(template, `title: Invented mixed-format phantom study
seed: 5
sources: data
reference: "{case}/scanner"
methods:
  - id: m-iterative
    label: Iterative (NIfTI)
    path: "{case}/iterative.nii.gz"
  - id: m-network
    label: Network (NumPy)
    path: "{case}/network.npy"
cases: auto
questions:
  - id: quality
    text: Overall quality?
    scale: {points: 5, low: Poor, high: Excellent}
readers: [R1]
${extraYaml}`);
  return { dir, template, ref };
}

function capture(): CliIO & { stdout: string; stderr: string } {
  const io = { stdout: '', stderr: '', isTTY: false, out(t: string) { io.stdout += t; }, err(t: string) { io.stderr += t; } };
  return io;
}
const hooks: CliHooks = { serve: async () => undefined };
async function check(args: string[]) {
  const io = capture();
  const code = await runCli(['check', ...args], hooks, io);
  return { code, ...io };
}

describe('veil check on a valid mixed-format study', () => {
  it('exits 0 with the case x method table, the axis convention and the display policy', async () => {
    const { template } = await mixedStudy();
    const r = await check([template]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('(slices, rows, columns)');
    expect(r.stdout).toContain('Display: matching none, intensity percentile, percentiles [0, 99.5].');
    expect(r.stdout).toMatch(/case\s+source\s+format\s+shape \(s x r x c\)\s+spacing mm \(c, r, s\)\s+data type\s+range/);
    expect(r.stdout).toMatch(/case-01\s+reference\s+dicom\s+5 x 12 x 16\s+1\.1, 0\.9, 3\.3\s+uint16\s+39\.5 to 1951\.3/);
    expect(r.stdout).toMatch(/case-01\s+m-iterative\s+nifti\s+5 x 12 x 16\s+1\.1, 0\.9, 3\.3\s+float32/);
    expect(r.stdout).toMatch(/case-02\s+m-network\s+npy\s+5 x 12 x 16\s+1, 1, 1 \(not stated\)\s+float32/);
    expect(r.stdout).toContain('OK: 2 cases ready to build.');
  });

  it('gives the same in JSON, with warnings (none here) and every source', async () => {
    const { template } = await mixedStudy();
    const r = await check([template, '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout) as CheckReport;
    expect(j.ok).toBe(true);
    expect(j.cases).toEqual(['case-01', 'case-02']);
    expect(j.problems).toEqual([]);
    expect(j.warnings).toEqual([]);
    expect(j.sources.map((s) => [s.case, s.source, s.format])).toEqual([
      ['case-01', 'reference', 'dicom'], ['case-01', 'm-iterative', 'nifti'], ['case-01', 'm-network', 'npy'],
      ['case-02', 'reference', 'dicom'], ['case-02', 'm-iterative', 'nifti'], ['case-02', 'm-network', 'npy'],
    ]);
    expect(j.axisConvention).toContain('(slices, rows, columns)');
  });
});

describe('veil check on broken studies: every problem at once, each naming case, method and file', () => {
  it('a truncated file and a method with a missing slice: exit 1, both named', async () => {
    const { dir, template, ref } = await mixedStudy();
    const nii = join(dir, 'data', 'case-01', 'iterative.nii.gz');
    const bytes = readFileSync(nii);
    writeFileSync(nii, bytes.subarray(0, bytes.length - 40));
    const npy = join(dir, 'data', 'case-02', 'network.npy');
    writeFileSync(npy, writeNpy(ref.pixels.subarray(0, 4 * 12 * 16), [4, 12, 16]));
    const r = await check([template]);
    expect(r.code).toBe(1);
    expect(r.stdout).toContain('2 problem(s); a build would fail:');
    expect(r.stdout).toContain(`  - case case-01, method m-iterative: ${nii}: cannot decompress the gzip stream: unexpected end of file`);
    expect(r.stdout).toContain(`  - case case-02, method m-network: ${npy}: has 4 slice(s) but the reference has 5: 4 x 12 x 16 vs 5 x 12 x 16`);
    expect(r.stdout).toMatch(/case-01\s+m-iterative\s+-\s+UNREADABLE/);
  });

  it('a missing source, a slice missing inside a DICOM series, and another orientation', async () => {
    const { dir, template } = await mixedStudy();
    rmSync(join(dir, 'data', 'case-01', 'network.npy'));
    rmSync(join(dir, 'data', 'case-02', 'scanner', 'IM-e')); // the middle slice of the series
    const other = await loadVolume(join(DICOM, 'series-u16-explicit'));
    other.orientation = [1, 0, 0, 0, 1, 0];
    writeFileSync(join(dir, 'data', 'case-01', 'iterative.nii.gz'), gzipSync(niftiOf(other)));
    const j = JSON.parse((await check([template, '--json'])).stdout) as CheckReport;
    expect(j.ok).toBe(false);
    const byWhere = Object.fromEntries(j.problems.map((p) => [`${p.case}/${p.source}`, p]));
    expect(byWhere['case-01/m-network'].message).toBe(`case case-01, method m-network: ${join(dir, 'data', 'case-01', 'network.npy')}: missing source: no such file or folder`);
    expect(byWhere['case-02/reference'].message).toMatch(/^case case-02, reference: \S+scanner: missing slices: a gap of 6\.6 mm between IM-a \(\S+ mm\) and IM-b/);
    expect(byWhere['case-01/m-iterative'].message).toMatch(/orientation \(row and column direction cosines\) 1\\0\\0\\0\\1\\0 differs from the reference's 0\.8\\0\.6\\0\\0\\0\\-1$/);
    expect(byWhere['case-01/m-iterative'].file).toBe(join(dir, 'data', 'case-01', 'iterative.nii.gz'));
    expect(j.problems).toHaveLength(3);
  });

  it('reports template errors in JSON too, with file and line', async () => {
    const dir = tempDir('veil-check-');
    const f = join(dir, 'bad.study.yaml');
    writeFileSync(f, 'title: x\nseed: 1\nsources: .\nmethods: []\ncases: auto\nquestions: []\nreaders: [R1]\ndisplay: {intensity: histogram}\n');
    const r = await check([f, '--json']);
    expect(r.code).toBe(1);
    const j = JSON.parse(r.stdout);
    expect(j.ok).toBe(false);
    expect(j.problems.map((p: { message: string }) => p.message)).toContain(
      `${f}:8:22: display.intensity: must be one of: none (one window per case, the reference's, for every method), percentile (each image scaled from its own low to high percentile), match-reference (each method mapped linearly onto the reference by a least-squares fit, then shown in the reference's window; needs a reference), got 'histogram'`,
    );
  });
});

describe('blinding warnings name the template setting that fixes them', () => {
  it('intensity scales that differ are a warning under intensity: none, and none under the default', async () => {
    const { dir, template, ref } = await mixedStudy('display: {intensity: none}');
    writeFileSync(join(dir, 'data', 'case-02', 'network.npy'), writeNpy(ref.pixels.map((x) => x * 40), [ref.slices, ref.rows, ref.columns]));
    const r = await check([template, '--json']);
    expect(r.code).toBe(0); // warnings do not fail the check
    const j = JSON.parse(r.stdout) as CheckReport;
    expect(j.warnings).toHaveLength(1);
    expect(j.warnings[0]).toMatchObject({ kind: 'blinding', case: 'case-02', source: 'm-network', fix: 'display: {intensity: percentile} or {intensity: match-reference}' });
    expect(j.warnings[0].message).toMatch(/^case case-02, method m-network: \S+network\.npy: intensities \(\S+ to \S+ at percentiles 0 to 99\.5\) differ from the reference's \(\S+ to \S+\), 40 times the width; shown in one window, readers could tell the methods apart\. Fix: display: \{intensity: percentile\}/);
    const human = await check([template]);
    expect(human.stdout).toContain('1 warning(s):\n  - [blinding] case case-02, method m-network: ');
    writeFileSync(template, readFileSync(template, 'utf8').replace('display: {intensity: none}', ''));
    expect((JSON.parse((await check([template, '--json'])).stdout) as CheckReport).warnings).toEqual([]);
  });

  it('a matrix that differs from the reference is a problem fixed by matching: reference-grid, which then checks the field of view', async () => {
    const { dir, template, ref } = await mixedStudy();
    const half = new Float32Array(ref.slices * 6 * 8);
    writeFileSync(join(dir, 'data', 'case-01', 'network.npy'), writeNpy(half, [ref.slices, 6, 8]));
    const small = { ...ref, rows: 6, columns: 8, pixels: half, spacing: [2.2, 1.8, ref.spacing[2]] as Volume['spacing'] };
    writeFileSync(join(dir, 'data', 'case-02', 'iterative.nii.gz'), gzipSync(niftiOf({ ...small, origin: ref.origin })));
    let j = JSON.parse((await check([template, '--json'])).stdout) as CheckReport;
    expect(j.problems.map((p) => p.message)).toEqual([
      expect.stringMatching(/^case case-01, method m-network: \S+: matrix 6 x 8 differs from the reference's 12 x 16: 5 x 6 x 8 vs 5 x 12 x 16 .*readers would see the difference\. Fix: display: \{matching: reference-grid\}/),
      expect.stringMatching(/^case case-02, method m-iterative: \S+: matrix 6 x 8 differs from the reference's 12 x 16/),
    ]);
    writeFileSync(template, `${readFileSync(template, 'utf8')}display: {matching: reference-grid}\n`);
    j = JSON.parse((await check([template, '--json'])).stdout) as CheckReport;
    expect(j.problems).toEqual([]); // same field of view: 8 x 2.2 = 16 x 1.1 mm
    writeFileSync(join(dir, 'data', 'case-02', 'iterative.nii.gz'), gzipSync(niftiOf({ ...small, spacing: [2, 1.8, ref.spacing[2]], origin: ref.origin })));
    j = JSON.parse((await check([template, '--json'])).stdout) as CheckReport;
    expect(j.problems.map((p) => p.message)).toEqual([
      expect.stringMatching(/^case case-02, method m-iterative: \S+: field of view 16 x 10\.8 mm differs from the reference's 17\.6 x 10\.8 mm \(columns x rows\)$/),
    ]);
  });

  it('without a reference, methods of different matrices are a blinding warning, not a problem', async () => {
    const { dir, template, ref } = await mixedStudy();
    writeFileSync(template, readFileSync(template, 'utf8').replace('reference: "{case}/scanner"\n', ''));
    writeFileSync(join(dir, 'data', 'case-01', 'network.npy'), writeNpy(new Float32Array(ref.slices * 6 * 8), [ref.slices, 6, 8]));
    const report = await checkStudy(loadTemplate(template));
    expect(report.ok).toBe(true);
    expect(report.warnings.map((w) => [w.kind, w.case, w.source, w.fix])).toEqual([
      ['blinding', 'case-01', 'm-network', 'display: {matching: reference-grid} (resamples every method in-plane to one grid, linear interpolation)'],
    ]);
    expect(report.warnings[0].message).toContain("matrix 6 x 8 differs from m-iterative's 12 x 16");
  });

  it('notes from the readers (uneven spacing) are source warnings', async () => {
    const { dir, template } = await mixedStudy();
    for (const c of ['case-01', 'case-02']) {
      rmSync(join(dir, 'data', c, 'scanner'), { recursive: true });
      cpSync(join(DICOM, 'uneven-spacing'), join(dir, 'data', c, 'scanner'), { recursive: true });
    }
    const report = await checkStudy(loadTemplate(template));
    const sourceNotes = report.warnings.filter((w) => w.kind === 'source');
    expect(sourceNotes.map((w) => w.case)).toEqual(['case-01', 'case-02']);
    expect(sourceNotes[0].message).toMatch(/^case case-01, reference: \S+scanner: uneven slice spacing: steps from 3\.3 to 3\.7 mm/);
  });
});
