/**
 * The foreground mask under which metrics are reported a second time: either a mask file (any
 * source format; nonzero voxels are foreground) or automatic from the reference: Otsu's threshold
 * (./otsu.ts) over the whole reference volume, the voxels above it, then their largest
 * face-connected component (./largest-component.ts), which drops isolated noise voxels in the
 * background, then that component's holes filled slice by slice (./fill-holes.ts), so that dark
 * tissue enclosed by a bright outline counts as foreground. Automatic masking of this kind is
 * common practice for MR metrics (e.g. the brain or body outline); its parameters are printed with
 * every report.
 */
import type { Volume } from '../images/volume.ts';
import { fillHolesBySlice } from './fill-holes.ts';
import { largestComponent } from './largest-component.ts';
import { MetricsError } from './metrics-error.ts';
import { otsuThreshold } from './otsu.ts';

export interface ForegroundMask {
  mask: Uint8Array;
  /** Foreground voxels. */
  voxels: number;
  source: 'auto' | 'file';
  /** The mask file (source 'file'). */
  path?: string;
  /** Otsu's threshold on the reference (source 'auto'). */
  threshold?: number;
  /** Connected components above the threshold, of which the largest was kept (source 'auto'). */
  components?: number;
  /** Voxels added by filling the largest component's holes (source 'auto'). */
  filled?: number;
}

export function shapeText(v: Pick<Volume, 'slices' | 'rows' | 'columns'>): string {
  return `${v.slices}x${v.rows}x${v.columns}`;
}

/** Throws, naming both files and shapes, unless the volumes have the same shape. */
export function requireSameShape(a: Volume, b: Volume, what: string): void {
  if (a.slices !== b.slices || a.rows !== b.rows || a.columns !== b.columns) {
    throw new MetricsError(
      `${what}: ${b.provenance.path} is ${shapeText(b)} but ${a.provenance.path} is ${shapeText(a)} ` +
        '(slices x rows x columns); both must have the same shape',
    );
  }
}

export function autoForegroundMask(reference: Volume): ForegroundMask {
  const threshold = otsuThreshold(reference.pixels);
  const above = new Uint8Array(reference.pixels.length);
  for (let i = 0; i < above.length; i++) above[i] = reference.pixels[i] > threshold ? 1 : 0;
  const { mask, voxels: kept, components } = largestComponent(above, reference);
  const filled = kept === 0 ? 0 : fillHolesBySlice(mask, reference);
  const voxels = kept + filled;
  if (voxels === 0) {
    throw new MetricsError(
      `${reference.provenance.path}: the automatic foreground mask is empty (no voxel above Otsu's threshold ${threshold}); give a mask file instead`,
    );
  }
  return { mask, voxels, source: 'auto', threshold, components, filled };
}

export function maskFromVolume(maskVolume: Volume, reference: Volume): ForegroundMask {
  requireSameShape(reference, maskVolume, 'mask and reference differ in shape');
  const mask = new Uint8Array(maskVolume.pixels.length);
  let voxels = 0;
  for (let i = 0; i < mask.length; i++) {
    const v = maskVolume.pixels[i];
    if (Number.isNaN(v)) throw new MetricsError(`${maskVolume.provenance.path}: mask voxel ${i} is NaN; a mask holds 0 (background) and nonzero (foreground)`);
    if (v !== 0) {
      mask[i] = 1;
      voxels++;
    }
  }
  if (voxels === 0) throw new MetricsError(`${maskVolume.provenance.path}: the mask has no foreground voxel (every value is 0)`);
  return { mask, voxels, source: 'file', path: maskVolume.provenance.path };
}
