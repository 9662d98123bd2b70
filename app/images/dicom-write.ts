/**
 * A minimal DICOM writer for Veil's own synthetic data (the demo): one MR Image Storage Part 10
 * file per slice, explicit VR little endian (PS3.5 section 7.1.2, transfer syntax
 * 1.2.840.10008.1.2.1), 16-bit unsigned pixels with Rescale Slope and Intercept carrying the
 * float values, geometry from the Volume. It writes no patient, institution or date attributes:
 * the data it writes are invented phantoms. UIDs are of the 2.25 form (a UUID as a decimal
 * integer, PS3.5 Annex B.2).
 */
import { randomUUID } from 'node:crypto';
import type { Volume } from './volume.ts';

const MR_IMAGE_STORAGE = '1.2.840.10008.5.1.4.1.1.4';
const EXPLICIT_VR_LE = '1.2.840.10008.1.2.1';
const IMPLEMENTATION_UID = '2.25.173285491238645591736431960932170012471';

export function newUid(): string {
  return `2.25.${BigInt(`0x${randomUUID().replaceAll('-', '')}`).toString()}`;
}

type Element = { tag: number; vr: string; value: Uint8Array };

const LONG_VRS = new Set(['OB', 'OW', 'OF', 'SQ', 'UT', 'UN']);

function text(tag: number, vr: string, s: string): Element {
  let v = s;
  if (v.length % 2) v += vr === 'UI' ? '\0' : ' ';
  return { tag, vr, value: new TextEncoder().encode(v) };
}

function us(tag: number, n: number): Element {
  const b = new Uint8Array(2);
  new DataView(b.buffer).setUint16(0, n, true);
  return { tag, vr: 'US', value: b };
}

function ul(tag: number, n: number): Element {
  const b = new Uint8Array(4);
  new DataView(b.buffer).setUint32(0, n, true);
  return { tag, vr: 'UL', value: b };
}

/** Decimal strings (DS) of at most 16 characters each, joined by backslashes. */
function ds(tag: number, values: number[]): Element {
  const fmt = (x: number) => {
    for (let p = 10; p > 0; p--) {
      const s = Number(x.toPrecision(p)).toString();
      if (s.length <= 16) return s;
    }
    return x.toExponential(6);
  };
  return text(tag, 'DS', values.map(fmt).join('\\'));
}

function encode(elements: Element[]): Uint8Array {
  const parts: Uint8Array[] = [];
  for (const e of [...elements].sort((a, b) => a.tag - b.tag)) {
    const long = LONG_VRS.has(e.vr);
    const head = new Uint8Array(long ? 12 : 8);
    const v = new DataView(head.buffer);
    v.setUint16(0, e.tag >>> 16, true);
    v.setUint16(2, e.tag & 0xffff, true);
    head[4] = e.vr.charCodeAt(0);
    head[5] = e.vr.charCodeAt(1);
    if (long) v.setUint32(8, e.value.length, true);
    else v.setUint16(6, e.value.length, true);
    parts.push(head, e.value);
  }
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let o = 0;
  for (const p of parts) { out.set(p, o); o += p.length; }
  return out;
}

export interface DicomSeriesInfo {
  seriesDescription?: string;
  seriesNumber?: number;
  studyUid?: string;
  seriesUid?: string;
  frameOfReferenceUid?: string;
  /** Writes BurnedInAnnotation YES (for tests of the blackout of burned-in text). */
  burnedIn?: boolean;
}

/** The files of one series, one per slice, in slice order. */
export function writeDicomSeries(v: Volume, info: DicomSeriesInfo = {}): Uint8Array[] {
  const studyUid = info.studyUid ?? newUid();
  const seriesUid = info.seriesUid ?? newUid();
  const frameUid = info.frameOfReferenceUid ?? newUid();
  const [rowX, rowY, rowZ, colX, colY, colZ] = v.orientation;
  const normal = [rowY * colZ - rowZ * colY, rowZ * colX - rowX * colZ, rowX * colY - rowY * colX];
  const n = v.rows * v.columns;
  const files: Uint8Array[] = [];
  for (let s = 0; s < v.slices; s++) {
    const slice = v.pixels.subarray(s * n, (s + 1) * n);
    let min = Infinity;
    let max = -Infinity;
    for (const x of slice) { if (x < min) min = x; if (x > max) max = x; }
    if (!Number.isFinite(min)) { min = 0; max = 0; }
    const slope = max > min ? (max - min) / 65535 : 1;
    const stored = new Uint8Array(n * 2);
    const sv = new DataView(stored.buffer);
    for (let i = 0; i < n; i++) sv.setUint16(i * 2, Math.round((slice[i] - min) / slope), true);
    const sopUid = newUid();
    const position = normal.map((d) => d * s * v.spacing[2]);
    const dataset = encode([
      text(0x00080016, 'UI', MR_IMAGE_STORAGE),
      text(0x00080018, 'UI', sopUid),
      text(0x00080060, 'CS', 'MR'),
      text(0x0008103e, 'LO', info.seriesDescription ?? ''),
      text(0x0020000d, 'UI', studyUid),
      text(0x0020000e, 'UI', seriesUid),
      text(0x00200011, 'IS', String(info.seriesNumber ?? 1)),
      text(0x00200013, 'IS', String(s + 1)),
      ds(0x00200032, position),
      ds(0x00200037, [rowX, rowY, rowZ, colX, colY, colZ]),
      text(0x00200052, 'UI', frameUid),
      ds(0x00180050, [v.spacing[2]]),
      us(0x00280002, 1),
      text(0x00280004, 'CS', 'MONOCHROME2'),
      us(0x00280010, v.rows),
      us(0x00280011, v.columns),
      ds(0x00280030, [v.spacing[1], v.spacing[0]]),
      us(0x00280100, 16),
      us(0x00280101, 16),
      us(0x00280102, 15),
      us(0x00280103, 0),
      ...(info.burnedIn ? [text(0x00280301, 'CS', 'YES')] : []),
      ds(0x00281052, [min]),
      ds(0x00281053, [slope]),
      { tag: 0x7fe00010, vr: 'OW', value: stored },
    ]);
    const metaBody = encode([
      { tag: 0x00020001, vr: 'OB', value: new Uint8Array([0, 1]) },
      text(0x00020002, 'UI', MR_IMAGE_STORAGE),
      text(0x00020003, 'UI', sopUid),
      text(0x00020010, 'UI', EXPLICIT_VR_LE),
      text(0x00020012, 'UI', IMPLEMENTATION_UID),
      text(0x00020013, 'SH', 'VEIL'),
    ]);
    const meta = encode([ul(0x00020000, metaBody.length)]);
    const file = new Uint8Array(132 + meta.length + metaBody.length + dataset.length);
    file.set(new TextEncoder().encode('DICM'), 128);
    file.set(meta, 132);
    file.set(metaBody, 132 + meta.length);
    file.set(dataset, 132 + meta.length + metaBody.length);
    files.push(file);
  }
  return files;
}
