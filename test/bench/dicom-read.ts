/**
 * Reading a DICOM series into a Float32 volume: 256 single-frame files of 512 x 512 uint16
 * (explicit VR little endian, rescaled, file names in random order), written by pydicom into a
 * temporary folder at bench time. Veil's loadVolume (parse, sort along the normal, checks,
 * rescale into Float32, SHA-256 of the files) against pydicom + NumPy doing the same reading,
 * sorting and Float32 rescaling, measured in the same run; best of 3 each, after a warm-up read,
 * so both read from the page cache. Goal: Veil at least 2x faster. Also reports Veil's peak
 * memory (maxRSS) for the read and whether both produced the same pixels (SHA-256 of the
 * Float32 volume). Veil runs with the environment the `veil` command gives its volume-reading
 * commands (glibc's huge-page tunable, bin/huge-pages.mjs); Python runs as it usually does, and
 * for transparency once more with that tunable.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
// @ts-expect-error a plain ES module of the launchers, without types
import { withHugePages, withoutHugePages } from '../../bin/huge-pages.mjs';

const REPO = join(import.meta.dirname, '..', '..');
const PYTHON = '/usr/bin/python3';
const SLICES = 256;
const SIZE = 512;
const RUNS = 3;

const WRITE = `
import sys, numpy as np, pydicom
from pydicom.dataset import Dataset, FileMetaDataset
from pydicom.uid import ExplicitVRLittleEndian, generate_uid
out, slices, size = sys.argv[1], int(sys.argv[2]), int(sys.argv[3])
rng = np.random.RandomState(1)
order = rng.permutation(slices)
series = generate_uid(prefix='2.25.')
y, x = np.mgrid[0:size, 0:size]
for k in range(slices):
    meta = FileMetaDataset()
    meta.MediaStorageSOPClassUID = '1.2.840.10008.5.1.4.1.1.4'
    meta.MediaStorageSOPInstanceUID = generate_uid(prefix='2.25.')
    meta.TransferSyntaxUID = ExplicitVRLittleEndian
    ds = Dataset(); ds.file_meta = meta; ds.preamble = b'\\0' * 128
    ds.is_little_endian = True; ds.is_implicit_VR = False
    ds.SOPClassUID = meta.MediaStorageSOPClassUID; ds.SOPInstanceUID = meta.MediaStorageSOPInstanceUID
    ds.SeriesInstanceUID = series; ds.Modality = 'MR'; ds.PatientName = 'Phantom^Invented'
    ds.InstanceNumber = k + 1
    ds.ImageOrientationPatient = ['1', '0', '0', '0', '1', '0']
    ds.ImagePositionPatient = ['-128', '-128', str(round(-100 + 0.8 * k, 4))]
    ds.PixelSpacing = ['0.5', '0.5']; ds.SliceThickness = '0.8'
    ds.SamplesPerPixel = 1; ds.PhotometricInterpretation = 'MONOCHROME2'
    ds.Rows = size; ds.Columns = size; ds.BitsAllocated = 16; ds.BitsStored = 16; ds.HighBit = 15
    ds.PixelRepresentation = 0; ds.RescaleSlope = '0.5'; ds.RescaleIntercept = '-10'
    img = ((x * 3 + y * 5 + k * 7) % 4000 + rng.randint(0, 50, size=(size, size))).astype('<u2')
    ds.PixelData = img.tobytes()
    ds.save_as(f'{out}/IM{order[k]:05d}', write_like_original=False)
`;

const READ = `
import sys, os, time, hashlib, numpy as np, pydicom
folder, runs = sys.argv[1], int(sys.argv[2])
def read():
    dss = [pydicom.dcmread(os.path.join(folder, f)) for f in sorted(os.listdir(folder))]
    iop = [float(v) for v in dss[0].ImageOrientationPatient]
    normal = np.cross(iop[:3], iop[3:])
    dss.sort(key=lambda ds: float(np.dot([float(v) for v in ds.ImagePositionPatient], normal)))
    vol = np.empty((len(dss), dss[0].Rows, dss[0].Columns), np.float32)
    for i, ds in enumerate(dss):
        vol[i] = ds.pixel_array.astype(np.float64) * float(ds.RescaleSlope) + float(ds.RescaleIntercept)
    return vol
times = []
for _ in range(runs):
    t0 = time.perf_counter(); vol = read(); times.append(time.perf_counter() - t0)
print(' '.join(str(t * 1000) for t in times), hashlib.sha256(vol.tobytes()).hexdigest(), pydicom.__version__, np.__version__)
`;

const VEIL = (folder: string, runs: number) => `
const { loadVolume } = await import(${JSON.stringify(join(REPO, 'app', 'images', 'load.ts'))});
const { createHash } = await import('node:crypto');
const times = [];
let v;
for (let i = 0; i < ${runs}; i++) {
  v = null;
  const t0 = performance.now();
  v = await loadVolume(${JSON.stringify(folder)});
  times.push(performance.now() - t0);
}
const sha = createHash('sha256').update(new Uint8Array(v.pixels.buffer)).digest('hex');
console.log(JSON.stringify({ times, sha, maxRssKb: process.resourceUsage().maxRSS, shape: [v.slices, v.rows, v.columns] }));`;

/** First write to every page of a fresh 256 MB Float32Array: the page faults a new volume costs. */
const TOUCH = `
const t0 = performance.now();
const a = new Float32Array(${SLICES * SIZE * SIZE});
for (let i = 0; i < a.length; i += 1024) a[i] = 1;
console.log(performance.now() - t0);`;

function runVeil(folder: string, runs: number): { times: number[]; sha: string; maxRssKb: number; shape: number[] } {
  const r = spawnSync(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', VEIL(folder, runs)], { cwd: REPO, encoding: 'utf8', maxBuffer: 1 << 20, env: withHugePages() });
  if (r.status !== 0) throw new Error(`Veil read failed: ${r.stderr}`);
  return JSON.parse(r.stdout.trim().split('\n').at(-1)!);
}

function runPydicom(folder: string, runs: number, huge = false): { times: number[]; sha: string; versions: string } {
  const env = huge ? withHugePages(withoutHugePages()) : withoutHugePages();
  const r = spawnSync(PYTHON, ['-c', READ, folder, String(runs)], { encoding: 'utf8', maxBuffer: 1 << 20, env });
  if (r.status !== 0) throw new Error(`pydicom read failed: ${r.stderr}`);
  const parts = r.stdout.trim().split(/\s+/);
  return { times: parts.slice(0, runs).map(Number), sha: parts[runs], versions: `pydicom ${parts[runs + 1]} + NumPy ${parts[runs + 2]}` };
}

export async function bench(): Promise<string[]> {
  const probe = spawnSync(PYTHON, ['-c', 'import pydicom, numpy'], { encoding: 'utf8', env: withoutHugePages() });
  if (probe.status !== 0) return [`dicom-read: skipped, ${PYTHON} with pydicom and numpy is not available (${probe.stderr.trim().split('\n').at(-1)})`];
  const folder = mkdtempSync(join(tmpdir(), 'veil-bench-dicom-'));
  try {
    const w = spawnSync(PYTHON, ['-c', WRITE, folder, String(SLICES), String(SIZE)], { encoding: 'utf8', env: withoutHugePages() });
    if (w.status !== 0) throw new Error(`writing the series with pydicom failed: ${w.stderr}`);
    runPydicom(folder, 1); // warms the page cache for both
    // Cold: one read in a fresh process, as \`veil check\` meets each volume; best of RUNS processes.
    const veilCold = Array.from({ length: RUNS }, () => runVeil(folder, 1));
    const pyCold = Array.from({ length: RUNS }, () => runPydicom(folder, 1));
    const pyColdHuge = Array.from({ length: RUNS }, () => runPydicom(folder, 1, true));
    // Warm: RUNS reads in one process; later reads may reuse memory the first one touched.
    const veilWarm = runVeil(folder, RUNS);
    const pyWarm = runPydicom(folder, RUNS);
    const touch = spawnSync(process.execPath, ['-e', TOUCH], { encoding: 'utf8', env: withoutHugePages() });
    const touchHuge = spawnSync(process.execPath, ['-e', TOUCH], { encoding: 'utf8', env: withHugePages(withoutHugePages()) });
    const best = (xs: number[]) => Math.min(...xs);
    const vc = best(veilCold.map((r) => r.times[0]));
    const pc = best(pyCold.map((r) => r.times[0]));
    const ph = best(pyColdHuge.map((r) => r.times[0]));
    const vw = best(veilWarm.times);
    const pw = best(pyWarm.times);
    const s = (ms: number) => `${(ms / 1000).toFixed(2)} s`;
    const same = [...veilCold, veilWarm].every((r) => r.sha === pyWarm.sha) && pyCold.every((r) => r.sha === pyWarm.sha);
    return [
      `DICOM series ${veilWarm.shape.join(' x ')} uint16 -> Float32 (${SLICES} files), Veil vs ${pyWarm.versions}; pixels ${same ? 'identical' : 'DIFFERENT'} (SHA-256 of the Float32 volume)`,
      `  cold (one read per fresh process, best of ${RUNS}): Veil ${s(vc)} vs ${s(pc)}: ${(pc / vc).toFixed(1)}x (goal >= 2x); ` +
        `Python given the same glibc huge-page tunable: ${s(ph)}, Veil ${(ph / vc).toFixed(1)}x`,
      `  warm (best of ${RUNS} reads in one process): Veil ${s(vw)} vs ${s(pw)}: ${(pw / vw).toFixed(1)}x`,
      `  first write to a fresh ${(SLICES * SIZE * SIZE * 4 / 2 ** 20).toFixed(0)} MB Float32Array in Node on this machine: ${s(Number(touch.stdout.trim()))} with 4 KB pages, ${s(Number(touchHuge.stdout.trim()))} with glibc's huge-page tunable (page faults; NumPy asks for huge pages too)`,
      `DICOM series read peak memory (maxRSS of the warm process, Volume ${(SLICES * SIZE * SIZE * 4 / 2 ** 20).toFixed(0)} MB): ${(veilWarm.maxRssKb / 1024).toFixed(0)} MB (goal < 1024 MB)`,
    ];
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}

if (process.argv[1] === import.meta.filename) for (const line of await bench()) console.log(line);
