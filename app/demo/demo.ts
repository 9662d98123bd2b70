/**
 * `veil demo --out DIR`: the invented demo study. Simulates, for six phantom cases, an MR
 * acquisition and three reconstructions at R = 4 (./acquire.ts: zero-filled, compressed sensing, and
 * compressed sensing then Gaussian-smoothed, which gains PSNR over zero-filled yet looks blurrier)
 * with the fully sampled image as the reference, writes a template and the sources, builds the study
 * (DIR/workspace.sqlite, DIR/kits/) and fills answers from two simulated readers into the
 * workspace, labelled `simulated`, so that report and agreement have data at once. The kits stay
 * unanswered for a person to try the reading room.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeNpy } from '../images/npy.ts';
import { newUid, writeDicomSeries, type DicomSeriesInfo } from '../images/dicom-write.ts';
import { writeNifti1 } from '../images/nifti-write.ts';
import { IDENTITY_ORIENTATION, type Volume } from '../images/volume.ts';
import { loadTemplate } from '../study/parse-template.ts';
import { buildStudy, type BuildProgress, type BuildSummary } from '../blinding/build.ts';
import { streamFor } from '../blinding/streams.ts';
import { addWorkspaceAnswers, openWorkspace, type WorkspaceAnswer } from '../store/workspace.ts';
import { audit } from '../store/open.ts';
import { makePhantom, type PhantomShape } from './phantom.ts';
import { acquireAndReconstruct, DEMO_ACQUISITION, type Reconstructions } from './acquire.ts';
import { gaussianBlur } from './degrade.ts';
import { latentScores, measureAppearance, simulatedScore, type SimulatedReader } from './simulated-readers.ts';

export const DEMO_SEED = 90210;
export const DEMO_TEMPLATE = 'demo.study.yaml';
export const DEMO_SHAPE: PhantomShape = { rows: 256, columns: 256, slices: 4 };
export const DEMO_CASES = ['case-01', 'case-02', 'case-03', 'case-04', 'case-05', 'case-06'];
const READERS: SimulatedReader[] = [
  { code: 'R1', bias: 0.25, noise: 0.55 },
  { code: 'R2', bias: -0.3, noise: 0.7 },
];

const TEMPLATE = `# Invented demo study of Veil: synthetic phantoms, simulated readers. No patient data.
title: Phantom brain, fourfold acceleration (demo)
seed: ${DEMO_SEED}
sources: sources
reference: "{case}/reference"         # a folder of DICOM files, as from a scanner
methods:
  - id: m-zerofill
    label: Zero-filled, R=4
    path: "{case}/zerofill.npy"
  - id: m-iterative
    label: Compressed sensing (FISTA, Haar wavelets), R=4
    path: "{case}/iterative.nii"
  - id: m-smoothed
    label: Compressed sensing then Gaussian-smoothed, R=4
    path: "{case}/smoothed"
cases: auto
questions:
  - id: sharpness
    text: How sharp are tissue edges?
    scale: {points: 5, low: Severely blurred, high: Crisp}
  - id: artifacts
    text: How free of artifacts is the image?
    scale: {points: 5, low: Dominated by artifacts, high: No artifacts}
  - id: confidence
    text: How confident would a diagnosis from this image be?
    scale: {points: 5, low: Non-diagnostic, high: Fully confident}
    labels: {1: Non-diagnostic, 3: Adequate, 5: Excellent}
readers: [${READERS.map((r) => r.code).join(', ')}]
design:
  presentation: single
  sessions: 2
  washout_days: 14
display:
  presets:                       # in percent of the default window (0 black, 100 white)
    - {name: Soft, low: 0, high: 70}
    - {name: Wide, low: -10, high: 130}
`;

const SPACING: [number, number, number] = [0.9, 0.9, 4];

function volumeOf(pixels: Float32Array): Volume {
  return { ...DEMO_SHAPE, spacing: SPACING, orientation: IDENTITY_ORIENTATION, pixels, provenance: { path: '', format: 'npy', sha256: '' } };
}

function writeDicomFolder(dir: string, v: Volume, info: DicomSeriesInfo): void {
  mkdirSync(dir, { recursive: true });
  writeDicomSeries(v, info).forEach((bytes, i) => writeFileSync(join(dir, `slice-${String(i + 1).padStart(3, '0')}.dcm`), bytes));
}

/** One case's simulated acquisition and reconstructions, exactly as the demo writes them. */
export function simulateDemoCase(caseId: string): Reconstructions {
  // A slight blur gives the phantom the partial-volume edges of a real image.
  const truth = gaussianBlur(makePhantom(streamFor(DEMO_SEED, 'demo-phantom', caseId), DEMO_SHAPE), DEMO_SHAPE, 0.6);
  return acquireAndReconstruct(truth, DEMO_SHAPE, DEMO_ACQUISITION, streamFor(DEMO_SEED, 'demo-acquisition', caseId));
}

export interface DemoSummary { template: string; build: BuildSummary; simulatedAnswers: number }

export async function writeDemo(outDir: string, onProgress?: (p: BuildProgress) => void): Promise<DemoSummary> {
  const latent = new Map<string, ReturnType<typeof latentScores>>();
  const shape = [DEMO_SHAPE.slices, DEMO_SHAPE.rows, DEMO_SHAPE.columns];
  for (const caseId of DEMO_CASES) {
    const dir = join(outDir, 'sources', caseId);
    mkdirSync(dir, { recursive: true });
    const recon = simulateDemoCase(caseId);
    // A mix of formats, as reconstruction teams hand them over: DICOM from the scanner, NumPy and
    // NIfTI from research code, and a re-exported DICOM series.
    const studyUid = newUid();
    writeDicomFolder(join(dir, 'reference'), volumeOf(recon.reference), { studyUid, seriesNumber: 1, seriesDescription: 'fully sampled' });
    writeFileSync(join(dir, 'zerofill.npy'), writeNpy(recon.zerofill, shape));
    writeFileSync(join(dir, 'iterative.nii'), writeNifti1(volumeOf(recon.iterative), 'demo reconstruction'));
    writeDicomFolder(join(dir, 'smoothed'), volumeOf(recon.smoothed), { studyUid, seriesNumber: 2, seriesDescription: 'smoothed' });
    const methods = { 'm-zerofill': recon.zerofill, 'm-iterative': recon.iterative, 'm-smoothed': recon.smoothed };
    for (const [methodId, img] of Object.entries(methods)) {
      latent.set(`${caseId}/${methodId}`, latentScores(measureAppearance(img, recon.reference, DEMO_SHAPE)));
    }
    onProgress?.({ done: DEMO_CASES.indexOf(caseId) + 1, total: DEMO_CASES.length, what: `simulated acquisition of ${caseId}` });
  }
  const templatePath = join(outDir, DEMO_TEMPLATE);
  writeFileSync(templatePath, TEMPLATE);
  const build = await buildStudy(loadTemplate(templatePath), outDir, onProgress);

  const ws = openWorkspace(build.workspace);
  try {
    const items = ws.db.prepare('SELECT item_id, reader_code, case_id, method_id FROM kit_item ORDER BY reader_code, position').all() as
      { item_id: string; reader_code: string; case_id: string; method_id: string }[];
    const answers: WorkspaceAnswer[] = [];
    for (const reader of READERS) {
      const rng = streamFor(DEMO_SEED, 'demo-simulated-reader', reader.code);
      for (const it of items.filter((i) => i.reader_code === reader.code)) {
        const l = latent.get(`${it.case_id}/${it.method_id}`)!;
        for (const q of ['sharpness', 'artifacts', 'confidence'] as const) {
          answers.push({ itemId: it.item_id, questionId: q, score: simulatedScore(l[q], reader, rng), seconds: null, source: 'simulated' });
        }
      }
    }
    addWorkspaceAnswers(ws.db, answers);
    audit(ws.db, 'demo.simulated-answers', { readers: READERS.map((r) => r.code), answers: answers.length, note: 'simulated readers, not people' });
    return { template: templatePath, build, simulatedAnswers: answers.length };
  } finally {
    ws.close();
  }
}
