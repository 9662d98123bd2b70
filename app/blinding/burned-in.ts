/**
 * Burned-in text: identifying text drawn into the pixels (a scanner's overlay, a screenshot's
 * caption) that no header cleaning removes. DICOM marks it with BurnedInAnnotation (0028,0301);
 * PS3.15 Annex E calls removing it the Clean Pixel Data option. Veil blacks out the rectangles
 * the template gives, on every slice, in the display image before it is written to a kit.
 */
import type { BurnedInSpec } from '../study/template.ts';

/** Whether the regions apply to a source, or why the build must stop. */
export function burnedInDecision(spec: BurnedInSpec | undefined, statesBurnedIn: boolean, what: string): { apply: boolean; problem: string | null } {
  const s = spec ?? { apply: 'when-stated', regions: [] };
  if (s.apply === 'never') return { apply: false, problem: null };
  const apply = s.apply === 'always' || statesBurnedIn;
  if (apply && s.regions.length === 0) {
    return {
      apply: false,
      problem: `${what} says it carries burned-in text (BurnedInAnnotation YES) and the template gives no burned_in.regions to black out; ` +
        'add the rectangles, or set burned_in.apply: never once you have checked the images hold no identifying text',
    };
  }
  return { apply, problem: null };
}

/** Sets the rectangles to 0 (black) on every slice of a display image, clipped to the image. */
export function blackOut(pixels: Uint16Array, rows: number, columns: number, slices: number, spec: BurnedInSpec): number {
  let cleared = 0;
  for (let s = 0; s < slices; s++) {
    for (const r of spec.regions) {
      for (let y = Math.max(0, r.y); y < Math.min(rows, r.y + r.height); y++) {
        const start = (s * rows + y) * columns;
        const from = start + Math.max(0, r.x);
        const to = start + Math.min(columns, r.x + r.width);
        if (to > from) { pixels.fill(0, from, to); cleared += to - from; }
      }
    }
  }
  return cleared;
}
