/**
 * `veil metrics`: the JSON matches the scikit-image fixtures of test/reference/metrics (made by
 * make-fixtures.py there), the text report prints the conventions, and bad input exits 1 with a
 * message naming the file.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { writeNpy } from '../../app/images/npy.ts';
import { runCli, type CliHooks, type CliIO } from '../../app/cli.ts';
import { tempDir } from './helpers.ts';

const DIR = fileURLToPath(new URL('../reference/metrics/', import.meta.url));
const fixture = JSON.parse(readFileSync(`${DIR}expected.json`, 'utf8')) as {
  cases: { name: string; reference: string; test: string; veil: Record<string, number>; automask?: Record<string, number>; filemask?: Record<string, number> & { file: string } }[];
};
const f32 = fixture.cases.find((c) => c.name === 'f32')!;

const hooks: CliHooks = { serve: async () => undefined };
async function run(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  const io = { stdout: '', stderr: '', isTTY: false, out(t: string) { io.stdout += t; }, err(t: string) { io.stderr += t; } } satisfies CliIO & Record<string, unknown>;
  const code = await runCli(args, hooks, io);
  return { code, stdout: io.stdout, stderr: io.stderr };
}

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.max(1, Math.abs(b));

describe('veil metrics', () => {
  it('--json gives psnr, ssim, nrmse, hfen, data_range and slices as scikit-image computes them', async () => {
    const r = await run(['metrics', '--reference', DIR + f32.reference, '--test', DIR + f32.test, '--json']);
    expect(r.code, r.stderr).toBe(0);
    const j = JSON.parse(r.stdout) as Record<string, unknown>;
    expect(Object.keys(j).slice(0, 6)).toEqual(['psnr', 'ssim', 'nrmse', 'hfen', 'data_range', 'slices']);
    for (const k of ['psnr', 'ssim', 'nrmse', 'hfen', 'data_range']) expect(rel(j[k] as number, f32.veil[k]), k).toBeLessThan(1e-12);
    expect(j.slices).toBe(3);
    expect(j.masked).toBeNull();
    expect((j.conventions as string[]).join('\n')).toMatch(/Gaussian window sigma 1\.5, 11x11.*K1 = 0\.01, K2 = 0\.03, population covariance/);
    expect(j.reference).toBe(DIR + f32.reference);
  });

  it('--mask auto and --mask FILE add masked values beside the unmasked ones', async () => {
    const auto = JSON.parse((await run(['metrics', '--reference', DIR + f32.reference, '--test', DIR + f32.test, '--mask', 'auto', '--json'])).stdout);
    for (const k of ['psnr', 'ssim', 'nrmse', 'hfen']) expect(rel(auto.masked[k], f32.automask![k]), k).toBeLessThan(1e-12);
    expect(rel(auto.ssim, f32.veil.ssim)).toBeLessThan(1e-12);
    expect(auto.mask).toMatchObject({ source: 'auto', voxels: f32.automask!.voxels });
    const file = JSON.parse((await run(['metrics', '--reference', DIR + f32.reference, '--test', DIR + f32.test, '--mask', DIR + f32.filemask!.file, '--json'])).stdout);
    for (const k of ['psnr', 'ssim', 'nrmse', 'hfen']) expect(rel(file.masked[k], f32.filemask![k]), k).toBeLessThan(1e-12);
  });

  it('--data-range replaces max - min of the reference, and says so', async () => {
    const r = JSON.parse((await run(['metrics', '--reference', DIR + f32.reference, '--test', DIR + f32.test, '--data-range', '200', '--json'])).stdout);
    expect(r.data_range).toBe(200);
    expect(r.data_range_source).toBe('given');
    // PSNR = 10 log10(L² / MSE): changing L from L0 to 200 adds 20 log10(200 / L0).
    expect(r.psnr).toBeCloseTo(f32.veil.psnr + 20 * Math.log10(200 / f32.veil.data_range), 10);
    expect(r.conventions[1]).toBe('Data range L = 200 (given).');
    expect((await run(['metrics', '--reference', DIR + f32.reference, '--test', DIR + f32.test, '--data-range', 'wide'])).code).toBe(2);
  });

  it('prints a readable table with the conventions used', async () => {
    const r = await run(['metrics', '--reference', DIR + f32.reference, '--test', DIR + f32.test, '--mask', 'auto']);
    expect(r.code).toBe(0);
    // The table's SSIM row: all voxels, then the automatic foreground mask (scikit-image fixture values).
    expect(r.stdout).toMatch(new RegExp(`SSIM\\s+${f32.veil.ssim.toFixed(6)}\\s+${f32.automask!.ssim.toFixed(6)}`));
    expect(r.stdout).toContain(`its holes filled slice by slice (${f32.automask!.filled} voxels)`);
    expect(r.stdout).toContain('Conventions:');
    expect(r.stdout).toContain("Otsu's threshold on the reference");
    expect(r.stdout).toContain('HFEN after Ravishankar & Bresler (2011)');
  });

  it('identical volumes: PSNR infinite (null in JSON), SSIM 1, NRMSE and HFEN 0', async () => {
    const r = JSON.parse((await run(['metrics', '--reference', DIR + f32.reference, '--test', DIR + f32.reference, '--json'])).stdout);
    expect(r).toMatchObject({ psnr: null, ssim: 1, nrmse: 0, hfen: 0 });
    expect((await run(['metrics', '--reference', DIR + f32.reference, '--test', DIR + f32.reference])).stdout).toMatch(/PSNR \(dB\)\s+inf/);
  });

  it('bad input exits 1 naming the file: shapes, unreadable files, NaN pixels, slices too small', async () => {
    const dir = tempDir();
    const other = join(dir, 'other.npy');
    writeFileSync(other, writeNpy(new Float32Array(3 * 24 * 27), [3, 24, 27]));
    const shape = await run(['metrics', '--reference', DIR + f32.reference, '--test', other]);
    expect(shape.code).toBe(1);
    expect(shape.stderr).toContain(`${other} is 3x24x27 but ${DIR + f32.reference} is 3x24x28`);

    const missing = join(dir, 'missing.npy');
    const gone = await run(['metrics', '--reference', DIR + f32.reference, '--test', missing]);
    expect(gone.code).toBe(1);
    expect(gone.stderr).toContain(missing);

    const broken = join(dir, 'broken.npy');
    writeFileSync(broken, 'not an array');
    expect((await run(['metrics', '--reference', broken, '--test', DIR + f32.test])).stderr).toContain(broken);

    const nan = join(dir, 'nan.npy');
    const px = new Float32Array(3 * 24 * 28).fill(1);
    px[24 * 28 + 28 * 2 + 5] = NaN;
    writeFileSync(nan, writeNpy(px, [3, 24, 28]));
    const n = await run(['metrics', '--reference', DIR + f32.reference, '--test', nan]);
    expect(n.code).toBe(1);
    expect(n.stderr).toContain(`${nan}: the pixel at slice 1, row 2, column 5 is NaN`);

    const small = join(dir, 'small.npy');
    writeFileSync(small, writeNpy(new Float32Array(64).map((_, i) => i), [8, 8]));
    const s = await run(['metrics', '--reference', small, '--test', small]);
    expect(s.code).toBe(1);
    expect(s.stderr).toContain(`${small}: slices of 8x8 pixels are too small for SSIM`);

    const flat = join(dir, 'flat.npy');
    writeFileSync(flat, writeNpy(new Float32Array(3 * 24 * 28).fill(7), [3, 24, 28]));
    const f = await run(['metrics', '--reference', flat, '--test', DIR + f32.test]);
    expect(f.code).toBe(1);
    expect(f.stderr).toContain(`${flat}: the reference has one value throughout`);
  });

  it('needs both --reference and --test (usage error, exit 2)', async () => {
    expect((await run(['metrics', '--reference', DIR + f32.reference])).code).toBe(2);
  });
});
