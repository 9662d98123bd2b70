/**
 * DICOM frames (from one file or a folder) into one Volume: split by SeriesInstanceUID, sorted
 * along the slice normal, checked for duplicates, gaps and uneven spacing.
 *
 * Sorting: with ImagePositionPatient and ImageOrientationPatient on every frame, by the position
 * along the normal n = row x column (the direction cosines of ImageOrientationPatient), i.e. by
 * ImagePositionPatient . n (PS3.3 C.7.6.2.1.1 defines the two; sorting on their dot product is
 * how DICOM-to-volume converters order slices, common practice). Otherwise by InstanceNumber, and
 * the order is reported. The slice spacing is the median step between positions.
 *
 * Tolerances (ours): positions closer than 1 % of the median step (at least 0.001 mm) are the same
 * position; a step over 1.5 times the median is a gap (missing slices); steps differing from the
 * median by more than 1 % are uneven. Direction cosines agree within 1e-4.
 */
import type { DicomFrame, Orientation } from './dicom-file.ts';
import { SourceError } from './source-error.ts';
import { IDENTITY_ORIENTATION } from './volume.ts';
import type { Volume } from './volume.ts';

export interface SeriesSummary {
  uid: string | null;
  description: string;
  images: number;
  /** Display names of the first files, for messages. */
  examples: string[];
}

const NO_UID = '(no SeriesInstanceUID)';

/** Frames grouped by SeriesInstanceUID, in order of first appearance. */
export function splitSeries(frames: DicomFrame[]): Map<string, DicomFrame[]> {
  const out = new Map<string, DicomFrame[]>();
  for (const f of frames) {
    const key = f.seriesUid ?? NO_UID;
    const list = out.get(key);
    if (list) list.push(f);
    else out.set(key, [f]);
  }
  return out;
}

export function summarize(groups: Map<string, DicomFrame[]>): SeriesSummary[] {
  return [...groups].map(([uid, frames]) => ({
    uid: uid === NO_UID ? null : uid,
    description: frames[0].seriesDescription,
    images: frames.length,
    examples: frames.slice(0, 2).map((f) => f.name),
  }));
}

/** The refusal for a folder holding several series: each one named, so the coordinator can pick. */
export function severalSeries(path: string, series: SeriesSummary[]): SourceError {
  const list = series
    .map((s) => `${s.uid ?? NO_UID}${s.description ? ` '${s.description}'` : ''} (${s.images} images, e.g. ${s.examples.join(', ')})`)
    .join('; ');
  return new SourceError(path, `holds ${series.length} series: ${list}; a method or reference path must name one series: move each into its own folder`);
}

const dot = (a: number[], b: number[]): number => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];

function cross(o: Orientation): [number, number, number] {
  const [a1, a2, a3, b1, b2, b3] = o;
  return [a2 * b3 - a3 * b2, a3 * b1 - a1 * b3, a1 * b2 - a2 * b1];
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Numbers in messages: up to 4 decimals, no trailing zeros. */
export function mm(x: number): string {
  return String(Number(x.toFixed(4)));
}

const byInstance = (a: DicomFrame, b: DicomFrame): number =>
  (a.instanceNumber ?? 0) - (b.instanceNumber ?? 0) || a.frameIndex - b.frameIndex || (a.name < b.name ? -1 : a.name > b.name ? 1 : 0);

/** A series put in order: the frames slice by slice and the volume they make, pixels still to fill. */
export interface SeriesPlan {
  sorted: DicomFrame[];
  volume: Volume;
}

/**
 * Orders the frames of one series and describes the Volume they make (its pixels allocated, not
 * yet filled). Problems that make the stack ambiguous (sizes, orientations or pixel spacings that
 * differ, duplicates, gaps) throw one SourceError naming the files; uneven spacing and the
 * fallback order are notes.
 */
export function planSeries(frames: DicomFrame[], path: string, provenance: Volume['provenance']): SeriesPlan {
  const problems: string[] = [];
  const notes: string[] = [];
  const first = frames[0];
  const sizes = new Map<string, DicomFrame[]>();
  for (const f of frames) {
    const k = `${f.rows} x ${f.columns}`;
    sizes.set(k, [...(sizes.get(k) ?? []), f]);
  }
  if (sizes.size > 1) {
    problems.push(`images differ in size (rows x columns): ${[...sizes].map(([k, fs]) => `${fs.length} of ${k} (e.g. ${fs[0].name})`).join(', ')}`);
  }
  const differs = (a: number[] | null, b: number[] | null, tol: number): boolean =>
    (a === null) !== (b === null) || (a !== null && b !== null && a.some((x, i) => Math.abs(x - b[i]) > tol));
  const oddOrientation = frames.find((f) => differs(f.orientation, first.orientation, 1e-4));
  if (oddOrientation) {
    problems.push(`images differ in ImageOrientationPatient: ${first.name} has ${first.orientation?.join('\\') ?? 'none'}, ${oddOrientation.name} has ${oddOrientation.orientation?.join('\\') ?? 'none'}`);
  }
  const oddSpacing = frames.find((f) => differs(f.pixelSpacing, first.pixelSpacing, 1e-4 * (first.pixelSpacing?.[0] ?? 1)));
  if (oddSpacing) {
    problems.push(`images differ in PixelSpacing: ${first.name} has ${first.pixelSpacing?.join('\\') ?? 'none'}, ${oddSpacing.name} has ${oddSpacing.pixelSpacing?.join('\\') ?? 'none'}`);
  }
  if (problems.length) throw new SourceError(path, problems.join('; '));

  let sorted: DicomFrame[];
  let sliceSpacing: number | null = null;
  const orientation = first.orientation;
  if (orientation && frames.every((f) => f.position !== null)) {
    const normal = cross(orientation);
    const keyed = frames.map((f) => ({ f, z: dot(f.position!, normal) }));
    keyed.sort((a, b) => a.z - b.z || byInstance(a.f, b.f));
    sorted = keyed.map((k) => k.f);
    if (keyed.length > 1) {
      const steps = keyed.slice(1).map((k, i) => k.z - keyed[i].z);
      const nominal = median(steps);
      sliceSpacing = nominal;
      const same = Math.max(1e-3, 0.01 * nominal);
      const duplicates: string[] = [];
      const gaps: string[] = [];
      let uneven = false;
      steps.forEach((d, i) => {
        const [a, b] = [keyed[i], keyed[i + 1]];
        if (d <= same) duplicates.push(`${a.f.name} and ${b.f.name} (${mm(a.z)} mm)`);
        else if (d > 1.5 * nominal) {
          const missing = Math.round(d / nominal) - 1;
          gaps.push(`a gap of ${mm(d)} mm between ${a.f.name} (${mm(a.z)} mm) and ${b.f.name} (${mm(b.z)} mm), about ${missing} slice${missing === 1 ? '' : 's'} missing`);
        } else if (Math.abs(d - nominal) > 0.01 * nominal) uneven = true;
      });
      if (duplicates.length) {
        problems.push(`${duplicates.length} pair(s) of images at the same position along the slice normal: ${duplicates.slice(0, 4).join(', ')}${duplicates.length > 4 ? ', ...' : ''}; each slice must appear once (repeats, echoes or time points belong in separate folders)`);
      }
      if (gaps.length) {
        problems.push(`missing slices: ${gaps.slice(0, 4).join(', ')}${gaps.length > 4 ? ', ...' : ''} where the usual step is ${mm(nominal)} mm`);
      }
      if (uneven && !duplicates.length && !gaps.length) {
        notes.push(`uneven slice spacing: steps from ${mm(Math.min(...steps))} to ${mm(Math.max(...steps))} mm; the volume uses the median, ${mm(nominal)} mm`);
      }
    }
  } else {
    sorted = [...frames].sort(byInstance);
    if (frames.length > 1) {
      const numbered = frames.every((f) => f.instanceNumber !== null);
      notes.push(
        numbered
          ? 'slices ordered by InstanceNumber: not every image states ImagePositionPatient and ImageOrientationPatient'
          : 'slices ordered by InstanceNumber and file name: the images state no positions and not all state InstanceNumber',
      );
      const owner = new Map<number, DicomFrame>();
      for (const f of sorted) {
        if (f.instanceNumber === null || f.frameIndex !== 0) continue;
        const other = owner.get(f.instanceNumber);
        if (other && other.file !== f.file) problems.push(`${other.name} and ${f.name} share InstanceNumber ${f.instanceNumber} and state no positions, so their order is unknown`);
        else owner.set(f.instanceNumber, f);
      }
    }
  }
  if (problems.length) throw new SourceError(path, problems.join('; '));

  const { rows, columns } = first;
  const types = new Set(sorted.map((f) => f.dataType));
  if (types.size > 1) notes.push(`images store different data types: ${[...types].join(', ')}`);
  const ps = first.pixelSpacing;
  sliceSpacing ??= first.spacingBetweenSlices ?? first.sliceThickness ?? null;
  const volume: Volume = {
    columns,
    rows,
    slices: sorted.length,
    spacing: [ps ? ps[1] : 1, ps ? ps[0] : 1, sliceSpacing ?? 1],
    orientation: orientation ? [...orientation] : [...IDENTITY_ORIENTATION],
    pixels: new Float32Array(rows * columns * sorted.length),
    provenance,
    stated: { spacing: ps !== null, orientation: orientation !== null },
    ...(orientation && sorted[0].position ? { origin: [...sorted[0].position] as [number, number, number] } : {}),
    ...(first.sliceThickness !== null ? { sliceThickness: first.sliceThickness } : {}),
    dataType: first.dataType,
    ...(sorted.some((f) => f.burnedIn) ? { burnedIn: true } : {}),
    notes,
    sliceSources: sorted.map((f) => f.name),
  };
  return { sorted, volume };
}

/** Decodes one frame into its slice of the volume and widens the volume's range by it. */
export function fillSlice(volume: Volume, slice: number, frame: DicomFrame): void {
  const r = frame.decode(volume.pixels, slice * volume.rows * volume.columns);
  if (r) volume.range = volume.range ? [Math.min(volume.range[0], r[0]), Math.max(volume.range[1], r[1])] : r;
}

/** Stacks the frames of one series (all bytes at hand) into a Volume. */
export function assembleSeries(frames: DicomFrame[], path: string, provenance: Volume['provenance']): Volume {
  const { sorted, volume } = planSeries(frames, path, provenance);
  sorted.forEach((f, i) => fillSlice(volume, i, f));
  volume.range ??= [0, 0];
  return volume;
}
