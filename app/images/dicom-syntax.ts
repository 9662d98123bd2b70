/**
 * DICOM transfer syntaxes (PS3.5 section 10 and Annex A; UIDs from PS3.6 Annex A) as Veil treats
 * them: read natively (uncompressed little and big endian, deflated, RLE Lossless), or refused with
 * the syntax named and a command of common open-source tools that decompresses the file.
 */
export type SyntaxKind = 'explicit-le' | 'implicit-le' | 'explicit-be' | 'deflated' | 'rle' | 'compressed';

export interface TransferSyntax {
  uid: string;
  name: string;
  kind: SyntaxKind;
  /** For compressed syntaxes Veil does not decode: how to decompress, with open-source tools. */
  decompress?: string;
}

const DCMDJPEG = 'dcmdjpeg IN.dcm OUT.dcm (DCMTK) or gdcmconv --raw IN.dcm OUT.dcm (GDCM)';
const DCMDJPLS = 'dcmdjpls IN.dcm OUT.dcm (DCMTK) or gdcmconv --raw IN.dcm OUT.dcm (GDCM)';
const GDCMCONV = 'gdcmconv --raw IN.dcm OUT.dcm (GDCM) or opj_decompress on the extracted frames (OpenJPEG)';
const NO_TOOL = 'gdcmconv --raw IN.dcm OUT.dcm (GDCM), where it supports the syntax, or export uncompressed from the system that made it';

const TABLE: TransferSyntax[] = [
  { uid: '1.2.840.10008.1.2', name: 'Implicit VR Little Endian', kind: 'implicit-le' },
  { uid: '1.2.840.10008.1.2.1', name: 'Explicit VR Little Endian', kind: 'explicit-le' },
  { uid: '1.2.840.10008.1.2.1.99', name: 'Deflated Explicit VR Little Endian', kind: 'deflated' },
  { uid: '1.2.840.10008.1.2.2', name: 'Explicit VR Big Endian (retired)', kind: 'explicit-be' },
  { uid: '1.2.840.10008.1.2.5', name: 'RLE Lossless', kind: 'rle' },
  { uid: '1.2.840.10008.1.2.4.50', name: 'JPEG Baseline (Process 1)', kind: 'compressed', decompress: DCMDJPEG },
  { uid: '1.2.840.10008.1.2.4.51', name: 'JPEG Extended (Process 2 & 4)', kind: 'compressed', decompress: DCMDJPEG },
  { uid: '1.2.840.10008.1.2.4.57', name: 'JPEG Lossless, Non-Hierarchical (Process 14)', kind: 'compressed', decompress: DCMDJPEG },
  { uid: '1.2.840.10008.1.2.4.70', name: 'JPEG Lossless, Non-Hierarchical, First-Order Prediction (Process 14, Selection Value 1)', kind: 'compressed', decompress: DCMDJPEG },
  { uid: '1.2.840.10008.1.2.4.80', name: 'JPEG-LS Lossless', kind: 'compressed', decompress: DCMDJPLS },
  { uid: '1.2.840.10008.1.2.4.81', name: 'JPEG-LS Lossy (Near-Lossless)', kind: 'compressed', decompress: DCMDJPLS },
  { uid: '1.2.840.10008.1.2.4.90', name: 'JPEG 2000 Image Compression (Lossless Only)', kind: 'compressed', decompress: GDCMCONV },
  { uid: '1.2.840.10008.1.2.4.91', name: 'JPEG 2000 Image Compression', kind: 'compressed', decompress: GDCMCONV },
  { uid: '1.2.840.10008.1.2.4.201', name: 'High-Throughput JPEG 2000 (Lossless Only)', kind: 'compressed', decompress: NO_TOOL },
  { uid: '1.2.840.10008.1.2.4.202', name: 'High-Throughput JPEG 2000 with RPCL Options (Lossless Only)', kind: 'compressed', decompress: NO_TOOL },
  { uid: '1.2.840.10008.1.2.4.203', name: 'High-Throughput JPEG 2000', kind: 'compressed', decompress: NO_TOOL },
  { uid: '1.2.840.10008.1.2.4.100', name: 'MPEG2 Main Profile / Main Level', kind: 'compressed', decompress: NO_TOOL },
  { uid: '1.2.840.10008.1.2.4.102', name: 'MPEG-4 AVC/H.264 High Profile / Level 4.1', kind: 'compressed', decompress: NO_TOOL },
];

const BY_UID = new Map(TABLE.map((t) => [t.uid, t]));

/** The syntax of a UID; an unknown UID is treated as an unknown compressed syntax. */
export function transferSyntax(uid: string): TransferSyntax {
  return BY_UID.get(uid) ?? { uid, name: 'an unknown transfer syntax', kind: 'compressed', decompress: NO_TOOL };
}

/** The one-line reason a compressed file is refused. */
export function refusal(ts: TransferSyntax): string {
  return (
    `pixel data is compressed with ${ts.name} (transfer syntax ${ts.uid}), which Veil does not decode; ` +
    `Veil reads uncompressed, deflated and RLE Lossless DICOM. Decompress it first, e.g. ${ts.decompress}`
  );
}
