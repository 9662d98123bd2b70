/**
 * RLE Lossless decoding, after DICOM PS3.5 Annex G.
 *
 * A frame is a 64-byte header, sixteen little-endian uint32: the number of segments (1 to 15)
 * and the byte offset of each segment from the start of the header; then the segments. Each
 * segment holds one byte plane of the image, most significant byte first (a 16-bit image has two:
 * high bytes, then low bytes), compressed with PackBits (G.3.1): a control byte n read as int8
 * copies the next n + 1 bytes when 0 <= n <= 127, repeats the next byte 1 - n times when
 * -127 <= n <= -1, and does nothing when n = -128.
 *
 * The output is the frame as uncompressed little-endian bytes, so that it decodes like native
 * pixel data. Every length comes from the frame's own header and the image size, and nothing is
 * written past the output, so a damaged frame is reported, never overrun.
 */
/** PackBits turns every 2 bytes into at most 128 (a repeat run), so n bytes decode to at most 64 n + 128. */
export function maxDecoded(segmentBytes: number): number {
  return 64 * segmentBytes + 128;
}

export function decodeRleFrame(
  frame: Uint8Array,
  pixels: number,
  bytesPerSample: number,
  fail: (why: string) => never,
): Uint8Array {
  if (frame.length < 64) fail(`RLE frame of ${frame.length} bytes is shorter than its 64-byte header`);
  const view = new DataView(frame.buffer, frame.byteOffset, frame.byteLength);
  const segments = view.getUint32(0, true);
  if (segments !== bytesPerSample) {
    fail(`RLE header announces ${segments} segment(s); a ${bytesPerSample * 8}-bit single-sample image has ${bytesPerSample}`);
  }
  const offsets: number[] = [];
  for (let s = 0; s < segments; s++) offsets.push(view.getUint32(4 + 4 * s, true));
  offsets.push(frame.length);
  for (let s = 0; s < segments; s++) {
    if (offsets[s] < 64 || offsets[s] > offsets[s + 1]) {
      fail(`RLE segment ${s + 1} has offset ${offsets[s]}, outside the frame of ${frame.length} bytes`);
    }
  }

  for (let s = 0; s < segments; s++) {
    if (pixels > maxDecoded(offsets[s + 1] - offsets[s])) {
      fail(`RLE segment ${s + 1} of ${offsets[s + 1] - offsets[s]} bytes cannot hold the ${pixels} bytes of the image`);
    }
  }
  const out = new Uint8Array(pixels * bytesPerSample);
  for (let s = 0; s < segments; s++) {
    // Segment s is byte (bytesPerSample - 1 - s) of each little-endian sample.
    const lane = bytesPerSample - 1 - s;
    let i = offsets[s];
    const end = offsets[s + 1];
    let p = 0;
    while (p < pixels && i < end) {
      const n = frame[i++];
      if (n < 128) {
        const count = Math.min(n + 1, pixels - p, end - i);
        for (let k = 0; k < count; k++) out[(p++) * bytesPerSample + lane] = frame[i++];
      } else if (n > 128) {
        if (i >= end) break;
        const value = frame[i++];
        const count = Math.min(257 - n, pixels - p);
        for (let k = 0; k < count; k++) out[(p++) * bytesPerSample + lane] = value;
      }
    }
    if (p < pixels) fail(`RLE segment ${s + 1} decodes to ${p} bytes; the image needs ${pixels}`);
  }
  return out;
}
