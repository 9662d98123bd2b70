import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { NpyError, readNpy, readNpyFile, writeNpy } from '../../app/images/npy.ts';
import type { NpyWritable } from '../../app/images/npy.ts';

const DIR = fileURLToPath(new URL('../reference/npy/', import.meta.url));

interface ReadFixture {
  file: string;
  descr: string;
  fortran_order: boolean;
  version: string;
  shape: number[];
  values: number[];
}
interface WriteFixture {
  file: string;
  type: 'Float32Array' | 'Int16Array' | 'Uint16Array' | 'Uint8Array';
  shape: number[];
  values: number[];
}
const expected = JSON.parse(readFileSync(join(DIR, 'expected.json'), 'utf8')) as {
  generator: { numpy: string };
  read: ReadFixture[];
  write: WriteFixture[];
  unsupported: { file: string; descr: string };
};

const fixture = (file: string): Uint8Array => new Uint8Array(readFileSync(join(DIR, file)));

/** A .npy file built by hand, for headers NumPy would never write. */
function handMade(header: string, data: Uint8Array, version = 1): Uint8Array {
  const lengthBytes = version === 1 ? 2 : 4;
  const out = new Uint8Array(8 + lengthBytes + header.length + data.length);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, version, 0]);
  const view = new DataView(out.buffer);
  if (version === 1) view.setUint16(8, header.length, true);
  else view.setUint32(8, header.length, true);
  out.set(new TextEncoder().encode(header), 8 + lengthBytes);
  out.set(data, 8 + lengthBytes + header.length);
  return out;
}

describe('readNpy on files written by numpy', () => {
  it('covers every supported dtype in both byte orders, both orders and all versions', () => {
    const descrs = new Set(expected.read.map((f) => f.descr));
    for (const d of ['f4', 'f8', 'i2', 'u2', 'i4', 'c8', 'c16']) {
      expect(descrs).toContain(`<${d}`);
      expect(descrs).toContain(`>${d}`);
    }
    expect(descrs).toContain('|u1');
    expect(descrs).toContain('|i1');
    expect(new Set(expected.read.map((f) => f.version))).toEqual(new Set(['1.0', '2.0', '3.0']));
    expect(expected.read.filter((f) => f.fortran_order).map((f) => f.shape.length).sort()).toEqual([2, 3]);
  });

  for (const f of expected.read) {
    it(`${f.file} (${f.descr}, ${f.fortran_order ? 'Fortran' : 'C'} order, version ${f.version}) holds numpy's values`, () => {
      const bytes = fixture(f.file);
      const v = readNpy(bytes, `fixtures/${f.file}`);
      const [slices, rows, columns] = f.shape.length === 2 ? [1, ...f.shape] : f.shape;
      expect([v.slices, v.rows, v.columns]).toEqual([slices, rows, columns]);
      expect(Array.from(v.pixels)).toEqual(Array.from(Float32Array.from(f.values)));
      expect(v.provenance).toEqual({
        path: `fixtures/${f.file}`,
        format: 'npy',
        sha256: createHash('sha256').update(bytes).digest('hex'),
      });
      expect(v.spacing).toEqual([1, 1, 1]);
      expect(v.orientation).toEqual([1, 0, 0, 0, 1, 0]);
    });
  }

  it('maps a Fortran-order 3D array onto (slice, row, column) as numpy indexes it', () => {
    // order-f-3d.npy holds a[s, r, c] = 1.5 * (12 s + 4 r + c) - 7 for shape (2, 3, 4).
    const v = readNpy(fixture('order-f-3d.npy'), 'order-f-3d.npy');
    const at = (s: number, r: number, c: number) => v.pixels[(s * v.rows + r) * v.columns + c];
    expect(at(1, 2, 3)).toBe(1.5 * 23 - 7);
    expect(at(0, 1, 0)).toBe(1.5 * 4 - 7);
    expect(at(1, 0, 2)).toBe(1.5 * 14 - 7);
  });

  it('readNpyFile reads from disk and records the absolute path', async () => {
    const v = await readNpyFile(join(DIR, 'order-c-2d.npy'));
    expect(v.provenance.path).toBe(join(DIR, 'order-c-2d.npy'));
    expect(v.pixels[0]).toBe(-7000);
  });
});

describe('writeNpy', () => {
  const make = (f: WriteFixture): NpyWritable => {
    const ctor = { Float32Array, Int16Array, Uint16Array, Uint8Array }[f.type];
    return ctor.from(f.values);
  };

  for (const f of expected.write) {
    it(`writes the same bytes as numpy ${expected.generator.numpy} np.save for ${f.file}`, () => {
      expect(Buffer.from(writeNpy(make(f), f.shape)).equals(Buffer.from(fixture(f.file)))).toBe(true);
    });
  }

  it('pads the header so the data starts at a multiple of 64 bytes', () => {
    for (const shape of [[1, 1], [7, 9], [12345, 1], [1, 2, 3]]) {
      const bytes = writeNpy(new Uint8Array(shape.reduce((a, b) => a * b)), shape);
      const headerLength = new DataView(bytes.buffer).getUint16(8, true);
      expect((10 + headerLength) % 64).toBe(0);
      expect(bytes[10 + headerLength - 1]).toBe(0x0a);
    }
  });

  it('is read back by readNpy', () => {
    const data = Float32Array.from({ length: 2 * 3 * 5 }, (_, i) => Math.sin(i) * 100);
    const v = readNpy(writeNpy(data, [2, 3, 5]), 'roundtrip.npy');
    expect([v.slices, v.rows, v.columns]).toEqual([2, 3, 5]);
    expect(v.pixels).toEqual(data);
    const u = readNpy(writeNpy(Uint16Array.from([1, 2, 65535, 4]), [2, 2]), 'plane.npy');
    expect([u.slices, u.rows, u.columns]).toEqual([1, 2, 2]);
    expect(Array.from(u.pixels)).toEqual([1, 2, 65535, 4]);
  });

  it('keeps float32 data in the bytes it was given when they are a whole buffer, and copies otherwise', () => {
    const data = Float32Array.from({ length: 24 }, (_, i) => i / 3);
    const bytes = writeNpy(data, [2, 3, 4]);
    expect(bytes.buffer.byteLength).toBe(bytes.byteLength);
    const kept = readNpy(bytes, 'kept.npy');
    expect(kept.pixels.buffer).toBe(bytes.buffer);
    expect(kept.pixels).toEqual(data);
    // A view into a larger buffer (which its owner may reuse) is copied.
    const larger = new Uint8Array(bytes.length + 64);
    larger.set(bytes, 64);
    const copied = readNpy(larger.subarray(64), 'copied.npy');
    expect(copied.pixels.buffer).not.toBe(larger.buffer);
    expect(copied.pixels).toEqual(data);
  });

  it('refuses a shape that does not match the data', () => {
    expect(() => writeNpy(new Float32Array(6), [2, 2])).toThrow(/shape \(2, 2\) holds 4 values but the data has 6/);
    expect(() => writeNpy(new Float32Array(6), [2, -3])).toThrow(/non-negative integers/);
  });
});

describe('readNpy errors name the file and say what is wrong', () => {
  it('truncated data', () => {
    const bytes = fixture('dtype-f4-le.npy');
    expect(() => readNpy(bytes.subarray(0, bytes.length - 5), 'scans/short.npy')).toThrow(
      'scans/short.npy: truncated data: shape (2, 2, 3) needs 48 bytes after the header, the file has 43',
    );
  });

  it('extra bytes after the data', () => {
    const bytes = new Uint8Array([...fixture('dtype-u1.npy'), 0, 0]);
    expect(() => readNpy(bytes, 'long.npy')).toThrow('long.npy: unexpected bytes after the data: shape (2, 2, 3) needs 12 bytes');
  });

  it('a truncated header', () => {
    expect(() => readNpy(fixture('dtype-u1.npy').subarray(0, 60), 'cut.npy')).toThrow(
      'cut.npy: truncated: the header is 118 bytes long but the file ends after 50',
    );
  });

  it('a bad magic string', () => {
    const bytes = fixture('dtype-u1.npy');
    bytes[1] = 0x58;
    expect(() => readNpy(bytes, 'phantom/not-npy.npy')).toThrow(
      /^phantom\/not-npy\.npy: not a NumPy \.npy file: it must start with the bytes 93 4e 55 4d 50 59 .*found 93 58 55 4d 50 59$/,
    );
    expect(() => readNpy(new Uint8Array(), 'empty.npy')).toThrow('empty.npy: not a NumPy .npy file');
  });

  it('an unsupported dtype written by numpy', () => {
    expect(expected.unsupported.descr).toBe('<U2');
    let error: unknown;
    try {
      readNpy(fixture(expected.unsupported.file), 'names.npy');
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(NpyError);
    expect((error as NpyError).path).toBe('names.npy');
    expect((error as Error).message).toBe(
      "names.npy: unsupported dtype '<U2'; supported: f4, f8, i2, u2, i4, u1, i1, c8, c16 (with byte order '<' or '>'; '|' for one-byte types)",
    );
  });

  it('other dtypes and byte orders numpy can write', () => {
    const header = (descr: string) => `{'descr': ${descr}, 'fortran_order': False, 'shape': (1, 1), }\n`;
    expect(() => readNpy(handMade(header("'<i8'"), new Uint8Array(8)), 'a.npy')).toThrow("a.npy: unsupported dtype '<i8'");
    expect(() => readNpy(handMade(header("'|f4'"), new Uint8Array(4)), 'b.npy')).toThrow("b.npy: unsupported dtype '|f4'");
    expect(() => readNpy(handMade(header("[('x', '<f4')]"), new Uint8Array(4)), 'c.npy')).toThrow(
      'c.npy: unsupported dtype: structured arrays are not images',
    );
  });

  it('an unsupported format version', () => {
    const bytes = fixture('dtype-u1.npy');
    bytes[6] = 4;
    expect(() => readNpy(bytes, 'v4.npy')).toThrow('v4.npy: unsupported .npy format version 4.0; supported: 1.0, 2.0, 3.0');
  });

  it('shapes that are not an image', () => {
    expect(() => readNpy(writeNpy(new Uint8Array(4), [4]), 'line.npy')).toThrow(
      'line.npy: shape (4,) has 1 dimension; expected 2 (rows, columns) or 3 (slices, rows, columns)',
    );
    expect(() => readNpy(writeNpy(new Uint8Array(16), [2, 2, 2, 2]), 'four.npy')).toThrow('four.npy: shape (2, 2, 2, 2) has 4 dimensions');
    expect(() => readNpy(writeNpy(new Uint8Array(0), [0, 3]), 'none.npy')).toThrow(
      'none.npy: shape (0, 3) is empty; every dimension must be at least 1',
    );
  });

  it('a malformed header', () => {
    const bad = handMade("{'descr': '<f4', 'fortran_order': False, 'shape': (1, 1) \n", new Uint8Array(4));
    expect(() => readNpy(bad, 'broken.npy')).toThrow(/^broken\.npy: malformed header \(expected ',' or '}' at character \d+\)/);
    const missing = handMade("{'descr': '<f4', 'shape': (1, 1), }\n", new Uint8Array(4));
    expect(() => readNpy(missing, 'keys.npy')).toThrow('keys.npy: malformed header: keys must be descr, fortran_order, shape; got descr, shape');
  });

  it('checks the data length before allocating for a huge declared shape', () => {
    const huge = handMade("{'descr': '<f8', 'fortran_order': False, 'shape': (100000, 100000, 100000), }\n", new Uint8Array(8), 2);
    expect(() => readNpy(huge, 'huge.npy')).toThrow('huge.npy: truncated data: shape (100000, 100000, 100000) needs 8000000000000000 bytes');
  });

  it('readNpyFile names a missing file', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'veil-npy-'));
    await expect(readNpyFile(join(dir, 'absent.npy'))).rejects.toThrow(`${join(dir, 'absent.npy')}: file not found`);
    writeFileSync(join(dir, 'text.npy'), 'not numpy at all');
    await expect(readNpyFile(join(dir, 'text.npy'))).rejects.toThrow(`${join(dir, 'text.npy')}: not a NumPy .npy file`);
  });
});
