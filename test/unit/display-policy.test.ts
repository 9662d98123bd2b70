/**
 * The display policy's arithmetic against reference libraries (test/reference/display/:
 * skimage.transform.resize for resampling, numpy.percentile, numpy.polyfit), and what each
 * intensity policy does to two methods that differ by a global factor.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { displayMapFor, leastSquaresLine, percentile, toDisplayUint16, DISPLAY_MAX } from '../../app/blinding/display-scale.ts';
import { resampleInPlane } from '../../app/images/resample.ts';
import type { Volume } from '../../app/images/volume.ts';
import { parseTemplate } from '../../app/study/parse-template.ts';
import { DEFAULT_DISPLAY, displayPolicy } from '../../app/study/template.ts';
import type { TemplateError } from '../../app/study/template.ts';

const ref = JSON.parse(readFileSync(fileURLToPath(new URL('../reference/display/expected.json', import.meta.url)), 'utf8')) as {
  resample: { shape: [number, number, number]; input: number[]; outputs: { rows: number; columns: number; values: number[] }[] };
  percentile: { sample: number[]; p: number[]; values: number[] };
  leastSquares: { x: number[]; y: number[]; slope: number; intercept: number };
};

function volume(pixels: Float32Array, slices: number, rows: number, columns: number, extra: Partial<Volume> = {}): Volume {
  return {
    slices, rows, columns, pixels, spacing: [0.5, 0.8, 3], orientation: [1, 0, 0, 0, 1, 0],
    provenance: { path: 'invented.npy', format: 'npy', sha256: '' }, ...extra,
  };
}

describe('in-plane resampling', () => {
  const [s, r, c] = ref.resample.shape;
  const input = volume(Float32Array.from(ref.resample.input), s, r, c, { origin: [10, 20, 30] });
  for (const o of ref.resample.outputs) {
    it(`${r} x ${c} -> ${o.rows} x ${o.columns} matches skimage.transform.resize(order=1, mode='edge')`, () => {
      const out = resampleInPlane(input, o.rows, o.columns);
      expect([out.slices, out.rows, out.columns]).toEqual([s, o.rows, o.columns]);
      // Same arithmetic in double, summed in another order; float32 results agree to rounding.
      out.pixels.forEach((x, i) => expect(Math.abs(x - o.values[i])).toBeLessThanOrEqual(1e-6 * Math.max(1, Math.abs(o.values[i]))));
      expect(out.spacing[0] * out.columns).toBeCloseTo(0.5 * c, 12); // the field of view is kept
      expect(out.spacing[1] * out.rows).toBeCloseTo(0.8 * r, 12);
      expect(out.spacing[2]).toBe(3);
    });
  }

  it('keeps the field of view edge: the first pixel centre moves by half the change in pixel size', () => {
    const out = resampleInPlane(input, r * 2, c * 2);
    expect(out.origin![0]).toBeCloseTo(10 - 0.125, 12);
    expect(out.origin![1]).toBeCloseTo(20 - 0.2, 12);
    expect(out.origin![2]).toBe(30);
  });

  it('gives the resampled pixels their own range, not the source\'s', () => {
    // One bright pixel: halving the matrix averages it with its neighbours, so the largest value falls.
    const px = new Float32Array(1 * 4 * 4);
    px[5] = 100;
    const out = resampleInPlane(volume(px, 1, 4, 4, { range: [0, 100] }), 2, 2);
    expect(out.range).toEqual([Math.min(...out.pixels), Math.max(...out.pixels)]);
    expect(out.range![1]).toBeLessThan(100);
  });

  it('returns the volume itself when it is already on the grid', () => {
    expect(resampleInPlane(input, r, c)).toBe(input);
  });
});

describe('display arithmetic', () => {
  it('percentile matches numpy.percentile (linear)', () => {
    const sample = Float32Array.from(ref.percentile.sample);
    ref.percentile.p.forEach((p, i) => expect(percentile(sample, p)).toBeCloseTo(ref.percentile.values[i], 4));
  });

  it('the least-squares line matches numpy.polyfit(x, y, 1)', () => {
    const fit = leastSquaresLine(Float32Array.from(ref.leastSquares.x), Float32Array.from(ref.leastSquares.y));
    expect(fit.slope).toBeCloseTo(ref.leastSquares.slope, 10);
    expect(fit.intercept).toBeCloseTo(ref.leastSquares.intercept, 8);
  });

  // Two invented methods of one case: b is a at 7 times the scale plus an offset of 100.
  const a = Float32Array.from({ length: 400 }, (_, i) => (i * 37) % 251);
  const b = a.map((x) => 7 * x + 100);
  const reference = Float32Array.from(a);
  const percentiles = [0, 99.5] as const;

  it('percentile and match-reference hide a global factor and offset; none keeps it', () => {
    const anchor = { bounds: [percentile(reference, 0), percentile(reference, 99.5)] as [number, number], pixels: reference };
    for (const policy of ['percentile', 'match-reference'] as const) {
      const da = toDisplayUint16(a, displayMapFor(policy, percentiles, a, anchor)).data;
      const db = toDisplayUint16(b, displayMapFor(policy, percentiles, b, anchor)).data;
      expect(Math.max(...da.map((x, i) => Math.abs(x - db[i])))).toBeLessThanOrEqual(1);
    }
    const na = toDisplayUint16(a, displayMapFor('none', percentiles, a, anchor)).data;
    const nb = toDisplayUint16(b, displayMapFor('none', percentiles, b, anchor)).data;
    expect(Math.max(...na)).toBeLessThanOrEqual(DISPLAY_MAX + 20);
    expect(Math.max(...nb)).toBeGreaterThan(5 * DISPLAY_MAX); // far brighter: the method would show
  });

  it('maps the window onto [0, DISPLAY_MAX], keeping headroom above and clamping below', () => {
    const px = Float32Array.from([-10, 0, 50, 100, 200, 1e9]);
    const { data } = toDisplayUint16(px, { slope: 1, intercept: 0, low: 0, high: 100 });
    expect(Array.from(data)).toEqual([0, 0, DISPLAY_MAX / 2, DISPLAY_MAX, 2 * DISPLAY_MAX, 65535]);
  });
});

describe('the display section of a template', () => {
  const BASE = `title: Invented
seed: 1
sources: data
methods:
  - {id: m-a, label: A, path: "{case}/a.npy"}
  - {id: m-b, label: B, path: "{case}/b.npy"}
cases: auto
questions:
  - {id: q, text: Quality?, scale: {points: 5, low: Poor, high: Good}}
readers: [R1]
`;
  const issues = (text: string) => {
    try {
      parseTemplate(text, '/studies/invented.study.yaml');
    } catch (e) {
      return (e as TemplateError).issues.map((i) => `${i.line}:${i.column} ${i.key}: ${i.message}`);
    }
    return [];
  };

  it('defaults to no resampling and percentile scaling from the 0th to the 99.5th percentile', () => {
    expect(displayPolicy(parseTemplate(BASE, '/s/x.study.yaml'))).toEqual(DEFAULT_DISPLAY);
    expect(DEFAULT_DISPLAY).toEqual({ matching: 'none', intensity: 'percentile', percentiles: [0, 99.5], presets: [] });
  });

  it('names the line of a reversed window and of match-reference without a reference', () => {
    expect(issues(`${BASE}display:\n  percentiles: [99, 1]\n  intensity: match-reference\n`)).toEqual([
      "12:16 display.percentiles: the low percentile must be below the high one, got [99, 1]; e.g. [0, 99.5]",
      "13:14 display.intensity: match-reference maps each method onto the reference, but the template has no 'reference'; add one, or use intensity: percentile",
    ]);
    expect(issues(`${BASE}display: {percentiles: [0, 120], matching: nearest}\n`)).toEqual([
      '11:28 display.percentiles[1]: must be a percentile from 0 to 100, got 120',
      "11:44 display.matching: must be one of: none (every image keeps its own matrix), reference-grid (every method is resampled in-plane, with linear interpolation, to the reference's rows and columns, or the first method's when there is no reference), got 'nearest'",
    ]);
    expect(issues(`${BASE}display: {colour: grey}\n`)).toEqual(["11:11 display.colour: unknown key 'colour'; allowed: matching, intensity, percentiles, presets"]);
  });
});
