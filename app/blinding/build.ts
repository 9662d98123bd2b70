/**
 * `veil build`: import every source, write the workspace (with the key) and one reading kit per
 * reader. Everything is written into a staging folder first and moved into place at the end, so
 * a failed build leaves the output folder as it was.
 */
import { existsSync, mkdirSync, readFileSync, readdirSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { StudyTemplate } from '../study/template.ts';
import { resolveCases } from '../study/cases.ts';
import { loadVolume } from '../images/load.ts';
import { displayPolicy } from '../study/template.ts';
import { availableParallelism } from 'node:os';
import { writeNpy } from '../images/npy.ts';
import { openWorkspace, WORKSPACE_FILE, writeKit, writeKitItems, writeMetric, writeSeries, writeStudy } from '../store/workspace.ts';
import { studyBlinding } from '../metrics/case-metrics.ts';
import type { ItemFeatures } from '../metrics/blinding-strength.ts';
import type { BlindingStrength } from '../metrics/blinding-strength.ts';
import { audit } from '../store/open.ts';
import { readingSchedule, summarizeDesign, type DesignSummary, type ScheduledItem } from './design.ts';
import { newSigningKey, sha256Hex, writeKitIntegrity, type KitFileEntry } from './kit-integrity.ts';
import { randomBytes } from 'node:crypto';
import { drawOpaqueIds, GENERATOR_NAME } from './streams.ts';
import { blackOut, burnedInDecision } from './burned-in.ts';
import { DISPLAY_MAX, displayMapFor, percentileWindow, toDisplayUint16 } from './display-scale.ts';
import { makeCaseImages, type CaseDone, type CaseImage, type CaseJob } from './case-images.ts';
import { CaseWorkers } from './build-workers.ts';
import { zipKit, zipLimitProblem } from './kit-zip.ts';
import { WriteQueue } from './write-queue.ts';
import { KIT_FORMAT, KIT_MANIFEST, KIT_VERSION, type KitItem, type KitManifest } from './kit-format.ts';

export const KITS_DIR = 'kits';

export { BuildError } from './build-error.ts';
import { BuildError } from './build-error.ts';

export interface BuildProgress { done: number; total: number; what: string }

export interface BuildSummary {
  title: string;
  seed: number;
  generator: string;
  cases: number;
  methods: number;
  readers: number;
  sessions: number;
  itemsPerReader: number;
  design: DesignSummary;
  /** Items with metrics against their case's reference. */
  metrics: number;
  /** Notes on items without metrics (no common grid). */
  metricNotes: string[];
  /** Could readers tell the methods apart from simple image statistics? Null with fewer than two cases. */
  blinding: BlindingStrength | null;
  workspace: string;
  /** `zip`: the kit as one archive for transfer (`BuildOptions.zip`). */
  kits: { reader: string; kitId: string; path: string; zip?: string; zipSkipped?: string; items: number; perSession: number[] }[];
}

export interface BuildOptions {
  /**
   * Worker threads that make the cases' images; 0 makes them in this thread. Default: one per
   * core when the sources hold at least PARALLEL_FROM_BYTES, else 0 (starting workers would cost
   * more than they save).
   */
  threads?: number;
  /** Also write each kit as `kits/<reader>.zip` for transfer (./kit-zip.ts). */
  zip?: boolean;
  /** Kits larger than this are not zipped (default ZIP_MAX_BYTES; smaller in tests). */
  zipMaxBytes?: number;
}

/** Sources of at least this many bytes in all are built on worker threads by default. */
export const PARALLEL_FROM_BYTES = 64 * 2 ** 20;
/** Bytes of kit images being written at once (./write-queue.ts). */
const WRITE_BUDGET = 64 * 2 ** 20;
/** Pixels that the cases running at once may hold together; more cases run only while under it. */
const PARALLEL_MEMORY_BUDGET = 512 * 2 ** 20;

function bytesAt(path: string): number {
  try {
    const st = statSync(path);
    if (!st.isDirectory()) return st.size;
    return readdirSync(path, { withFileTypes: true }).reduce((n, e) => n + (e.isFile() ? statSync(join(path, e.name)).size : 0), 0);
  } catch {
    return 0; // the reader will say what is wrong with it
  }
}

function defaultBuildThreads(jobs: CaseJob[]): number {
  let total = 0;
  for (const j of jobs) {
    for (const p of [j.reference, ...j.methods.map((m) => m.path)]) if (p) total += bytesAt(p);
    if (total >= PARALLEL_FROM_BYTES) return availableParallelism();
  }
  return 0;
}

/**
 * Makes every case's images, on the workers when there are any: one case first, then as many
 * at once as the workers and the memory budget allow (sized on the largest case seen so far).
 * `onDone` gets each finished case with its index. The first error stops the build.
 */
async function runCases(
  jobs: CaseJob[],
  workers: CaseWorkers | null,
  onImage: (caseIndex: number, image: CaseImage) => Promise<void>,
  onDone: (caseIndex: number, done: CaseDone) => void,
  signal?: AbortSignal,
): Promise<void> {
  if (!workers) {
    for (const [i, job] of jobs.entries()) onDone(i, await makeCaseImages(job, (img) => onImage(i, img), signal));
    return;
  }
  signal?.throwIfAborted();
  let peak = 0;
  const running = new Set<Promise<void>>();
  let failure: unknown = null;
  // A cancel does not wait for the cases running: closing the workers stops them.
  const cancelled = new Promise<void>((wake) => signal?.addEventListener('abort', () => {
    failure ??= signal.reason;
    wake();
  }, { once: true }));
  const next = () => Promise.race([...running, cancelled]);
  for (const [i, job] of jobs.entries()) {
    const limit = peak === 0 ? 1 : Math.max(1, Math.min(workers.size, Math.floor(PARALLEL_MEMORY_BUDGET / peak)));
    while (running.size >= limit && failure === null) await next();
    if (failure !== null) break;
    const p: Promise<void> = workers.run(job, (img) => onImage(i, img)).then(
      (done) => {
        peak = Math.max(peak, done.peakBytes);
        onDone(i, done);
      },
      (e: unknown) => {
        failure ??= e;
      },
    ).finally(() => running.delete(p));
    running.add(p);
  }
  // On a failure the cases still running are not waited for either.
  while (running.size > 0 && failure === null) await next();
  if (failure !== null) throw failure;
}

/** `signal` cancels the build between volumes; a cancelled build leaves the output folder as it was. */
export async function buildStudy(
  template: StudyTemplate, outDir: string, onProgress?: (p: BuildProgress) => void, signal?: AbortSignal, options: BuildOptions = {},
): Promise<BuildSummary> {
  const out = resolve(outDir);
  const resolution = resolveCases(template);
  if (resolution.problems.length) throw new BuildError(resolution.problems);
  if (existsSync(join(out, WORKSPACE_FILE)) || existsSync(join(out, KITS_DIR))) {
    throw new BuildError([`${out} already holds a built study (${WORKSPACE_FILE} or ${KITS_DIR}/); choose an empty folder or remove them first`]);
  }
  const caseIds = resolution.cases.map((c) => c.caseId);
  const methodIds = template.methods.map((m) => m.id);
  const presentation = template.design.presentation;
  const schedule = readingSchedule(template.seed, template.readers, caseIds, methodIds, template.design.sessions, presentation);
  const design = summarizeDesign(schedule, template.seed, GENERATOR_NAME, template.design.sessions, presentation);
  // Kit ids are random, not seeded: two builds of one template must not accept each other's bundles.
  const kitIds = template.readers.map(() => `kit-${randomBytes(8).toString('hex')}`);

  mkdirSync(out, { recursive: true });
  const staging = join(out, `.veil-staging-${process.pid}`);
  rmSync(staging, { recursive: true, force: true });
  mkdirSync(join(staging, KITS_DIR), { recursive: true });
  const ws = openWorkspace(join(staging, WORKSPACE_FILE));
  // The staging workspace is thrown away on any failure, so it need not reach the disk row by row;
  // it is made durable once, before it is moved into place.
  ws.db.pragma('synchronous = OFF');
  // Image writes overlap with making the next images; WRITE_BUDGET bounds the images in flight.
  const writes = new WriteQueue(WRITE_BUDGET);
  try {
    // Which items show a (case, method) volume, and in which view (0: single or left, 1: right).
    const itemsByPair = new Map<string, { it: ScheduledItem; view: number }[]>();
    for (const it of schedule) {
      [it.methodId, it.rightMethodId].forEach((m, view) => {
        if (!m) return;
        const k = `${it.caseId}\u0000${m}`;
        itemsByPair.set(k, [...(itemsByPair.get(k) ?? []), { it, view }]);
      });
    }
    const kitItems = new Map<string, Map<string, KitItem>>(template.readers.map((r) => [r, new Map()]));
    for (const r of template.readers) mkdirSync(join(staging, KITS_DIR, r, 'images'), { recursive: true });
    const seriesIds = new Map<string, number>();
    const imageHashes = new Map<string, Map<string, KitFileEntry>>(template.readers.map((r) => [r, new Map()]));
    const total = resolution.cases.length * (methodIds.length + (template.reference ? 1 : 0));
    let done = 0;

    const templateText = readFileSync(template.file, 'utf8');
    const signingKey = newSigningKey();
    ws.db.transaction(() => {
      writeStudy(ws.db, template, templateText, GENERATOR_NAME, caseIds);
      ws.db.prepare('UPDATE study SET design = ? WHERE id = 1').run(JSON.stringify(design));
      ws.db.prepare('INSERT INTO signing_key (id, private_pem, public_der, created_at) VALUES (1, ?, ?, ?)')
        .run(signingKey.privatePem, signingKey.publicDer, new Date().toISOString());
    })();

    const display = displayPolicy(template);
    const features: ItemFeatures[] = [];
    const metricNotes: string[] = [];
    let metricCount = 0;

    // Kit files are written as each image arrives; workspace rows are written case by case in the
    // template's order, whichever case finishes first, so that two builds give the same rows.
    const waitingRows = new Map<number, { images: CaseImage[]; done: CaseDone | null }>();
    let nextRows = 0;
    const writeRowsInOrder = () => {
      for (let w = waitingRows.get(nextRows); w?.done; w = waitingRows.get(nextRows)) {
        for (const img of w.images) {
          seriesIds.set(`${img.caseId}\u0000${img.kind === 'method' ? img.methodId : ''}`,
            writeSeries(ws.db, img.caseId, img.kind === 'method' ? img.methodId : null, img.series));
          if (img.kind === 'method' && img.metrics) {
            writeMetric(ws.db, img.caseId, img.methodId, img.metrics.row.values, img.metrics.detail);
            metricCount++;
          }
        }
        metricNotes.push(...w.done.metricNotes);
        waitingRows.delete(nextRows++);
      }
    };
    const takeImage = async (caseIndex: number, img: CaseImage): Promise<void> => {
      const rows = waitingRows.get(caseIndex) ?? { images: [], done: null };
      waitingRows.set(caseIndex, rows);
      if (img.kind === 'method') {
        const { image, methodId } = img;
        // Kept for the workspace rows without the image bytes.
        rows.images.push({ ...img, image: { ...image, bytes: new Uint8Array(0) } });
        features.push({ case: img.caseId, method: methodId, stats: img.stats });
        const paths: string[] = [];
        for (const { it, view } of itemsByPair.get(`${img.caseId}\u0000${methodId}`) ?? []) {
          const file = it.rightMethodId ? `images/${it.itemId}-${view + 1}.npy` : `images/${it.itemId}.npy`;
          paths.push(join(staging, KITS_DIR, it.reader, file));
          imageHashes.get(it.reader)!.set(file, { path: file, bytes: image.bytes.length, sha256: image.sha256 });
          const entry = kitItems.get(it.reader)!.get(it.itemId) ?? { id: it.itemId, session: it.session, views: [] };
          entry.views[view] = { image: file, columns: image.columns, rows: image.rows, slices: image.slices, spacing: image.spacing, window: image.window };
          kitItems.get(it.reader)!.set(it.itemId, entry);
        }
        onProgress?.({ done: ++done, total, what: `case ${img.caseId}: ${methodId}` });
        await writes.add(image.bytes, paths);
      } else {
        rows.images.push(img);
        onProgress?.({ done: ++done, total, what: `case ${img.caseId}: reference` });
      }
    };
    const jobs: CaseJob[] = resolution.cases.map((c) => ({
      caseId: c.caseId,
      reference: c.reference ?? null,
      methods: methodIds.map((id) => ({ id, path: c.methods[id] })),
      display: { matching: display.matching, intensity: display.intensity, percentiles: display.percentiles },
      burnedIn: template.burned_in,
    }));
    const threads = options.threads ?? defaultBuildThreads(jobs);
    const workers = threads > 0 ? new CaseWorkers(threads) : null;
    try {
      await runCases(jobs, workers, takeImage, (i, d) => {
        const rows = waitingRows.get(i) ?? { images: [], done: null };
        rows.done = d;
        waitingRows.set(i, rows);
        writeRowsInOrder();
      }, signal);
    } finally {
      await workers?.close();
    }

    // Calibration items: read first by every reader, in the template's order, each with its own opaque id.
    const calibrationItems = new Map<string, KitItem[]>(template.readers.map((r) => [r, []]));
    const taken = new Set(schedule.map((x) => x.itemId));
    const calibrationIds = drawOpaqueIds(template.seed, 'calibration-ids', template.calibration.length * template.readers.length + taken.size)
      .filter((id) => !taken.has(id));
    for (const [k, cal] of template.calibration.entries()) {
      const v = await loadVolume(cal.path);
      const anchorOwn = { bounds: percentileWindow(v.pixels, display.percentiles), pixels: null };
      const shown = toDisplayUint16(v.pixels, displayMapFor('percentile', display.percentiles, v.pixels, anchorOwn));
      const burned = burnedInDecision(template.burned_in, !!v.burnedIn, `calibration item ${k + 1} (${cal.path})`);
      if (burned.problem) throw new BuildError([burned.problem]);
      if (burned.apply) blackOut(shown.data, v.rows, v.columns, v.slices, template.burned_in!);
      const bytes = writeNpy(shown.data, v.slices === 1 ? [v.rows, v.columns] : [v.slices, v.rows, v.columns]);
      const sha256 = sha256Hex(bytes);
      const ids = template.readers.map((_, r) => calibrationIds[r * template.calibration.length + k]);
      await writes.add(bytes, template.readers.map((reader, r) => join(staging, KITS_DIR, reader, `images/${ids[r]}.npy`)));
      template.readers.forEach((reader, r) => {
        const id = ids[r];
        const image = `images/${id}.npy`;
        imageHashes.get(reader)!.set(image, { path: image, bytes: bytes.length, sha256 });
        calibrationItems.get(reader)!.push({
          id, session: 1, calibration: { scores: cal.scores, note: cal.note },
          views: [{ image, columns: v.columns, rows: v.rows, slices: v.slices, spacing: v.spacing, window: shown.window }],
        });
        ws.db.prepare('INSERT INTO calibration_item (item_id, reader_code, position, path, scores, note) VALUES (?, ?, ?, ?, ?, ?)')
          .run(id, reader, k, cal.path, JSON.stringify(cal.scores), cal.note);
      });
    }

    await writes.flush();
    const blinding = studyBlinding(features, template.seed);
    ws.db.prepare('UPDATE study SET blinding = ? WHERE id = 1').run(blinding ? JSON.stringify(blinding) : null);
    const createdAt = new Date().toISOString();
    const kits: BuildSummary['kits'] = [];
    ws.db.transaction(() => {
      template.readers.forEach((reader, r) => {
        const mine = schedule.filter((s) => s.reader === reader).sort((a, b) => a.position - b.position);
        const manifest: KitManifest = {
          format: KIT_FORMAT, version: KIT_VERSION, kitId: kitIds[r], reader, title: template.title, createdAt,
          sessions: template.design.sessions, washoutDays: template.design.washout_days,
          presentation: template.design.presentation,
          revisits: template.design.revisits ?? false,
          // Window presets in display units (0 and DISPLAY_MAX are the default window's black and white).
          presets: display.presets.map((p) => ({
            name: p.name, center: ((p.low + p.high) / 200) * DISPLAY_MAX, width: ((p.high - p.low) / 100) * DISPLAY_MAX,
          })),
          questions: template.questions.map((q) => ({
            id: q.id, text: q.text, points: q.scale.points, low: q.scale.low, high: q.scale.high,
            labels: Object.fromEntries(Object.entries(q.labels).map(([k, v]) => [String(k), v])),
            type: q.type ?? 'likert', required: q.required ?? true, comment: q.comment ?? false,
          })),
          items: [...calibrationItems.get(reader)!, ...mine.map((s) => kitItems.get(reader)!.get(s.itemId)!)],
        };
        writeFileSync(join(staging, KITS_DIR, reader, KIT_MANIFEST), JSON.stringify(manifest, null, 1));
        const finalPath = join(out, KITS_DIR, reader);
        const bundleKey = randomBytes(32).toString('base64');
        writeKitIntegrity(join(staging, KITS_DIR, reader), kitIds[r], bundleKey, signingKey, imageHashes.get(reader));
        writeKit(ws.db, reader, kitIds[r], finalPath, bundleKey, signingKey.publicDer);
        writeKitItems(ws.db, mine, (caseId, methodId) => seriesIds.get(`${caseId}\u0000${methodId}`)!);
        const perSession = Array.from({ length: template.design.sessions }, (_, i) => mine.filter((m) => m.session === i + 1).length);
        kits.push({ reader, kitId: kitIds[r], path: finalPath, items: mine.length, perSession });
      });
      audit(ws.db, 'study.built', { out, cases: caseIds.length, readers: template.readers.length, seed: template.seed, generator: GENERATOR_NAME });
    })();
    ws.db.pragma('synchronous = FULL');
    ws.db.pragma('wal_checkpoint(TRUNCATE)');
    if (options.zip) {
      for (const k of kits) {
        signal?.throwIfAborted();
        onProgress?.({ done, total, what: `kit ${k.reader}: zip for transfer` });
        const tooLarge = zipLimitProblem(join(staging, KITS_DIR, k.reader), options.zipMaxBytes);
        if (tooLarge) {
          k.zipSkipped = tooLarge;
          continue;
        }
        await zipKit(join(staging, KITS_DIR, k.reader), join(staging, KITS_DIR, `${k.reader}.zip`));
        k.zip = join(out, KITS_DIR, `${k.reader}.zip`);
      }
    }
    ws.close();
    renameSync(join(staging, WORKSPACE_FILE), join(out, WORKSPACE_FILE));
    renameSync(join(staging, KITS_DIR), join(out, KITS_DIR));
    rmSync(staging, { recursive: true, force: true });
    return {
      title: template.title, seed: template.seed, generator: GENERATOR_NAME, cases: caseIds.length,
      methods: methodIds.length, readers: template.readers.length, sessions: template.design.sessions,
      itemsPerReader: schedule.length / template.readers.length, design,
      metrics: metricCount, metricNotes, blinding, workspace: join(out, WORKSPACE_FILE), kits,
    };
  } catch (e) {
    ws.close();
    await writes.settle();
    rmSync(staging, { recursive: true, force: true });
    throw e;
  }
}
